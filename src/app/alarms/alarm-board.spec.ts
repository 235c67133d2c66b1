import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter, Router } from '@angular/router';
import type { Me, Role } from '../../../shared/contracts/api';
import type { AlarmView } from '../../../shared/contracts/alarms';
import { Session } from '../auth/session';
import { LIVE_SOCKET_FACTORY } from '../live/live-connection';
import { AlarmBoard } from './alarm-board';
import { FakeSocket, alarmView } from '../testing/spec-fixtures';

const alarm = (over: Partial<AlarmView>): AlarmView => alarmView({ unitId: 7, serial: 'QHL-2407', ...over });

let current: HttpTestingController | null = null;

async function render(role: Role, alarms: AlarmView[]) {
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
  const me: Me = { id: 3, email: 'p@example.org', name: 'Mara Okonjo', role, ownerId: role === 'owner' ? 1 : null };
  TestBed.inject(Session).signIn({ email: me.email, password: 'x' }).subscribe();
  http.expectOne('/api/auth/sign-in').flush(me);
  const fixture = TestBed.createComponent(AlarmBoard);
  http.expectOne('/api/sites').flush([{ id: 1, name: 'Harbour Roof', timeZone: 'Europe/London' }]);
  http.expectOne((r) => r.url === '/api/alarms' && r.params.get('state') === 'active').flush(alarms);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const titles = () => [...el.querySelectorAll('bw-alarm-card h3')].map((h) => h.textContent!.trim());
  const sevs = () => [...el.querySelectorAll('[data-testid^="alarm-sev-"]')].map((s) => s.textContent!.replace(/\s+/g, ' ').trim());
  return { fixture, http, el, titles, sevs };
}

describe('AlarmBoard', () => {
  afterEach(() => {
    current?.verify();
    current = null;
  });

  it('lists open alarms most urgent first, with severity in words, site-local times and UTC on hover', async () => {
    const { el, titles, sevs } = await render('technician', [
      alarm({ id: 1, severity: 'P3', kind: 'stall' }),
      alarm({ id: 2, severity: 'P1', kind: 'not-stowed' }),
      alarm({ id: 3, severity: 'P2', kind: 'trap', evidence: { lossWm2: 300 } }),
    ]);
    expect(titles()).toEqual(['Did not stow', 'Stuck on a lesser peak', 'Actuator stall']);
    expect(sevs()).toEqual(['release_alertP1 Urgent', 'warningP2 High', 'reportP3 Medium']);
    expect(el.querySelector('[data-testid="count-P1"]')!.textContent).toContain('1');
    // 09:00 UTC is 10:00 in London in June.
    expect(el.querySelector('[data-testid="alarm-1"] .facts dd')!.textContent).toContain('10:00');
    expect(el.querySelector('[data-testid="alarm-traces-1"]')!.getAttribute('href')).toContain(
      '/traces?units=7&from=2026-06-21T08:30:00.000Z',
    );
  });

  it('lets a technician acknowledge: posts, then shows who acknowledged and hides the button', async () => {
    const { fixture, http, el } = await render('technician', [alarm({ id: 4 })]);
    const button = el.querySelector<HTMLButtonElement>('[data-testid="ack-4"]')!;
    expect(button).not.toBeNull();
    button.click();
    const req = http.expectOne('/api/alarms/4/acknowledge');
    expect(req.request.method).toBe('POST');
    req.flush(alarm({ id: 4, acknowledgedAt: '2026-06-21T10:01:00Z', acknowledgedBy: 'Mara Okonjo' }));
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="ack-4"]')).toBeNull();
    expect(el.querySelector('[data-testid="alarm-status-4"]')!.textContent).toContain('Acknowledged by Mara Okonjo');
  });

  it("opens the alarm's ticket in one step for a technician and goes to it", async () => {
    const { fixture, http, el } = await render('technician', [alarm({ id: 6, state: 'active' })]);
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    el.querySelector<HTMLButtonElement>('[data-testid="ticket-for-6"]')!.click();
    const req = http.expectOne('/api/tickets');
    expect(req.request.body).toEqual({ alarmId: 6 });
    req.flush({ id: 41 });
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/tickets', 41]);
  });

  it('shows crews and owners alarms read-only (no acknowledge, no trace links)', async () => {
    for (const role of ['crew', 'owner'] as const) {
      current?.verify();
      TestBed.resetTestingModule();
      const { el } = await render(role, [alarm({ id: 5 })]);
      expect(el.querySelector('[data-testid="alarm-5"]')).not.toBeNull();
      expect(el.querySelector('[data-testid="ack-5"]')).toBeNull();
      expect(el.querySelector('[data-testid="ticket-for-5"]')).toBeNull();
      expect(el.querySelector('[data-testid="alarm-traces-5"]')).toBeNull();
      expect(el.textContent).toContain('the control room acknowledges them');
    }
  });

  it('follows live alarm messages: a new alarm appears, a cleared one leaves the open list, stow events are ignored', async () => {
    const { fixture, titles } = await render('engineer', [alarm({ id: 1 })]);
    FakeSocket.last!.push({ type: 'alarm', alarm: alarm({ id: 9, severity: 'P2', kind: 'hunting' }) });
    FakeSocket.last!.push({ type: 'alarm', alarm: alarm({ id: 1, state: 'cleared', clearedAt: '2026-06-21T10:30:00Z' }) });
    FakeSocket.last!.push({
      type: 'alarm',
      alarm: {
        kind: 'wind-stow',
        severity: 'P4',
        state: 'event',
        serial: 'S',
        siteId: 1,
        at: '2026-06-21T10:00:00Z',
        event: 'stowed',
        message: 'm',
      },
    });
    await fixture.whenStable();
    expect(titles()).toEqual(['Hunting']);
  });

  it('shows an empty state, and an error with a retry when alarms cannot be read', async () => {
    const { fixture, http, el } = await render('technician', []);
    expect(el.querySelector('[data-testid="alarms-empty"]')!.textContent).toContain('No open alarms.');
    fixture.componentInstance['setState']('cleared');
    http
      .expectOne((r) => r.url === '/api/alarms' && r.params.get('state') === 'cleared')
      .flush({ error: { message: 'Database unavailable.' } }, { status: 503, statusText: 'x' });
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('Alarms could not be loaded.');
  });
});
