import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import type { Me, Role } from '../../../shared/contracts/api';
import type { TicketView } from '../../../shared/contracts/tickets';
import { Session } from '../auth/session';
import { TicketDetail } from './ticket-detail';
import { LIVE_SOCKET_FACTORY } from '../live/live-connection';
import { FakeSocket } from '../testing/spec-fixtures';

const ticket = (over: Partial<TicketView> = {}): TicketView => ({
  id: 12,
  state: 'acknowledged',
  version: 3,
  siteId: 1,
  siteName: 'Harbour Roof',
  unitId: 7,
  serial: 'QHL-2407',
  kind: 'stall',
  severity: 'P2',
  title: 'Tilt drive stalls',
  description: null,
  assignee: { id: 5, name: 'Ines Calder' },
  openedAt: '2026-06-21T09:00:00Z',
  openedBy: null,
  acknowledgedAt: '2026-06-21T09:20:00Z',
  onSiteAt: null,
  resolvedAt: null,
  closedAt: null,
  cancelledAt: null,
  waitingReason: null,
  closure: null,
  availabilityCategory: 'forced-outage',
  lostEnergyKwh: null,
  parts: [],
  clocks: [
    { name: 'acknowledge', dueAt: '2026-06-21T10:00:00Z', metAt: '2026-06-21T09:20:00Z', status: 'met' },
    { name: 'onSite', dueAt: '2026-06-22T09:00:00Z', metAt: null, status: 'running' },
    { name: 'fix', dueAt: '2026-06-24T09:00:00Z', metAt: null, status: 'breached' },
  ],
  next: ['on-site', 'waiting'],
  transitions: [],
  alarms: [],
  ...over,
});

let current: HttpTestingController | null = null;

async function render(role: Role, t: TicketView) {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      provideRouter([]),
      { provide: LIVE_SOCKET_FACTORY, useValue: () => new FakeSocket() as unknown as WebSocket },
    ],
  });
  const http = TestBed.inject(HttpTestingController);
  current = http;
  const me: Me = { id: 5, email: 'p@example.org', name: 'Ines Calder', role, ownerId: role === 'owner' ? 1 : null };
  TestBed.inject(Session).signIn({ email: me.email, password: 'x' }).subscribe();
  http.expectOne('/api/auth/sign-in').flush(me);
  const fixture = TestBed.createComponent(TicketDetail);
  fixture.componentRef.setInput('id', '12');
  await fixture.whenStable();
  http.expectOne('/api/tickets/12').flush(t);
  http.expectOne('/api/sites/1').flush({ id: 1, name: 'Harbour Roof', timeZone: 'Europe/London' });
  http.expectOne('/api/units/7').flush({ id: 7, serial: 'QHL-2407', planXM: 6, planYM: 5 });
  http.expectOne('/api/units/7/state').flush({
    unitId: 7,
    serial: 'QHL-2407',
    online: true,
    lastReportAt: '2026-06-21T09:30:00Z',
    mode: 'held',
    poaWm2: 640,
    dcPowerW: 251,
    tiltDeg: 30,
    azimuthDeg: 180,
    onHold: true,
  });
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const q = (id: string) => el.querySelector(`[data-testid="${id}"]`) as HTMLElement | null;
  return { fixture, http, el, q };
}

describe('TicketDetail', () => {
  afterEach(() => {
    current?.verify();
    current = null;
  });

  it('shows the clocks in words and site time, and checks in only after the cautions are confirmed', async () => {
    const { fixture, http, q } = await render('crew', ticket());
    expect(q('ticket-state')!.textContent).toContain('Acknowledged by crew');
    // The unit as it is now, and where it stands.
    expect(q('ticket-unit-now')!.textContent).toContain('DC power 251 W');
    expect(q('ticket-unit-place')!.textContent).toContain('6 m east and 5 m north');
    // 09:20 UTC is 10:20 in London in June.
    expect(q('clock-acknowledge')!.textContent).toContain('Met');
    expect(q('clock-acknowledge')!.textContent).toContain('10:20');
    expect(q('clock-fix')!.textContent).toContain('Breached');
    q('move-on-site')!.click();
    await fixture.whenStable();
    expect(q('check-in-cautions')!.textContent).toContain('not lockout/tagout');
    expect((q('move-submit') as HTMLButtonElement).disabled).toBe(true);
    (q('move-confirm')!.querySelector('input') as HTMLInputElement).click();
    await fixture.whenStable();
    expect((q('move-submit') as HTMLButtonElement).disabled).toBe(false);
    q('move-submit')!.click();
    const req = http.expectOne('/api/tickets/12/transition');
    expect(req.request.body).toEqual({ to: 'on-site', version: 3, confirm: true });
    req.flush(ticket({ state: 'on-site', version: 4, next: ['resolved', 'waiting'] }));
    http.expectOne('/api/tickets/12').flush(ticket({ state: 'on-site', version: 4, next: ['resolved', 'waiting'] }));
    await fixture.whenStable();
    expect(q('ticket-state')!.textContent).toContain('Crew on site');
  });

  it('offers an owner no moves, only the reading', async () => {
    const { el, q } = await render('owner', ticket({ next: [], lostEnergyKwh: 1.25 }));
    expect(q('ticket-lost-energy')!.textContent).toContain('1.25 kWh DC');
    expect(el.querySelectorAll('[data-testid^="move-"]')).toHaveLength(0);
    expect(el.textContent).toContain('You can read this ticket');
    expect(el.querySelector('[data-testid="add-file"]')).toBeNull();
  });

  const photo = {
    id: 3,
    ticketId: 12,
    contentType: 'image/jpeg' as const,
    fileName: 'gearbox.jpg',
    sizeBytes: 2_516_582, // 2.4 MiB
    sha256: 'ab'.repeat(32),
    caption: 'Gearbox before the swap',
    widthPx: 1200,
    heightPx: 1600,
    uploadedBy: { id: 5, name: 'Ines Calder' },
    uploadedAt: '2026-06-21T10:05:00Z',
    takenAt: '2026-06-21T10:01:00Z',
    latitudeDeg: 51.505,
    longitudeDeg: -0.125,
    url: '/api/tickets/12/files/3',
    thumbUrl: '/api/tickets/12/files/3?thumb=1',
  };

  it("shows the ticket's photos with their thumbnail, and lets the assigned crew member add one from the camera", async () => {
    const { fixture, http, el, q } = await render('crew', ticket({ files: [photo] }));
    const img = q('ticket-files')!.querySelector('img')!;
    expect(img.getAttribute('src')).toBe('/api/tickets/12/files/3?thumb=1');
    expect(img.getAttribute('alt')).toBe('Gearbox before the swap');
    expect(q('ticket-files')!.textContent).toContain('2.4 MB');
    // 10:01 UTC is 11:01 in London in June.
    expect(q('ticket-files')!.textContent).toContain('Taken 21 Jun 2026, 11:01:00 BST at 51.50500, -0.12500');
    const input = q('file-input') as HTMLInputElement;
    expect(input.getAttribute('capture')).toBe('environment');
    expect(input.getAttribute('accept')).toBe('image/jpeg,image/png,image/webp,application/pdf');
    const file = new File([new Uint8Array([0xff, 0xd8, 0xff])], 'after.jpg', { type: 'image/jpeg' });
    Object.defineProperty(input, 'files', { value: [file] });
    input.dispatchEvent(new Event('change'));
    const req = http.expectOne('/api/tickets/12/files');
    expect(req.request.method).toBe('POST');
    const form = req.request.body as FormData;
    expect((form.get('file') as File).name).toBe('after.jpg');
    req.flush({ ...photo, id: 4 });
    http.expectOne('/api/tickets/12').flush(ticket({ files: [photo, { ...photo, id: 4 }] }));
    await fixture.whenStable();
    expect(el.querySelectorAll('[data-testid="ticket-files"] li')).toHaveLength(2);
  });

  it('offers no upload to a crew member the ticket is not assigned to, nor on a closed ticket', async () => {
    const other = await render('crew', ticket({ assignee: { id: 9, name: 'Kwame Ruiz' } }));
    expect(other.q('add-file')).toBeNull();
    expect(other.el.textContent).toContain('No photos or documents yet.');
    TestBed.resetTestingModule();
    current = null;
    const closed = await render('technician', ticket({ state: 'closed', next: ['reopened'] }));
    expect(closed.q('add-file')).toBeNull();
  });
});
