import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import type { Me, Role } from '../../../shared/contracts/api';
import type { TicketView } from '../../../shared/contracts/tickets';
import { Session } from '../auth/session';
import { TicketDetail } from './ticket-detail';

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
  TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
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
    const { el } = await render('owner', ticket({ next: [] }));
    expect(el.querySelectorAll('[data-testid^="move-"]')).toHaveLength(0);
    expect(el.textContent).toContain('You can read this ticket');
  });
});
