import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
import type { Me, Role, Site, Unit } from '../../../shared/contracts/api';
import type { UnitLiveState } from '../../../shared/contracts/live';
import { Session } from '../auth/session';
import { LIVE_SOCKET_FACTORY } from '../live/live-connection';
import { shortfallPercent, siteTime, statusLook, utcTime } from '../live/unit-status';
import { FakeSocket, alarmView } from '../testing/spec-fixtures';
import { appendLive } from './last-hour';
import { UnitView } from './unit-view';

const state = (over: Partial<UnitLiveState> = {}): UnitLiveState => ({
  unitId: 1,
  serial: 'QHL-2401',
  siteId: 1,
  online: true,
  lastReportAt: '2026-06-21T10:00:00Z',
  mode: 'settled',
  poaWm2: 800,
  dcPowerW: 300,
  tiltDeg: 30,
  azimuthDeg: 180,
  cmdTiltDeg: 30,
  cmdAzimuthDeg: 180,
  tiltDiffWm2: 0,
  azimuthDiffWm2: 0,
  moduleTempC: 30,
  onHold: false,
  holds: [],
  ...over,
});

describe('unit view values', () => {
  it('shows state by word and icon; offline and hold win over the reported mode', () => {
    expect(statusLook(state())).toMatchObject({ label: 'Settled', icon: 'check_circle' });
    expect(statusLook(state({ online: false }))).toMatchObject({ label: 'Offline', icon: 'cloud_off' });
    expect(statusLook(state({ onHold: true, mode: 'seeking' }))).toMatchObject({ label: 'Maintenance hold' });
    expect(statusLook(null).label).toBe('Never reported');
  });

  it('compares with the modelled best only in daylight', () => {
    expect(shortfallPercent(800, 1000)).toBe(20);
    expect(shortfallPercent(1100, 1000)).toBe(0);
    expect(shortfallPercent(5, 20)).toBeNull();
    expect(shortfallPercent(null, 1000)).toBeNull();
  });

  it('writes times in the site zone with the UTC instant for tooltips', () => {
    expect(siteTime('2026-06-21T12:00:05Z', 'Europe/Berlin')).toMatch(/^14:00:05 (CEST|GMT\+2)$/);
    expect(siteTime('2026-12-21T12:00:05Z', 'Europe/London', true)).toMatch(/21 Dec 2026.*12:00:05/);
    expect(utcTime('2026-06-21T12:00:05.123Z')).toBe('2026-06-21 12:00:05 UTC');
  });

  it('adds each newer live report to the last hour and drops older points', () => {
    const t0 = Date.parse('2026-06-21T10:00:00Z');
    const pts = [{ t: t0 - 3_700_000, poa: 1, power: 1, tilt: 1, cmdTilt: 1, azimuth: 1, cmdAzimuth: 1 }];
    const next = appendLive(pts, state({ lastReportAt: new Date(t0).toISOString(), poaWm2: 812 }));
    expect(next.map((p) => p.poa)).toEqual([812]);
    expect(appendLive(next, state({ lastReportAt: new Date(t0).toISOString() }))).toHaveLength(1);
  });
});

const UNIT = {
  id: 5,
  serial: 'QHL-2405',
  siteId: 1,
  siteName: 'Harbour Roof',
  ratedPowerWp: 400,
  detectorTiltDeg: 6,
  firmware: '2.4.1',
} as unknown as Unit;
const SITE = { id: 1, name: 'Harbour Roof', timeZone: 'Europe/London' } as unknown as Site;

let http: HttpTestingController | null = null;

/** The unit view as one role, with every request it makes answered; `others` lists what else it asked for. */
async function renderUnitView(role: Role) {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      provideRouter([]),
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      // Charts never draw here: the library is never loaded.
      provideEchartsCore({ echarts: () => new Promise<never>(() => undefined) }),
      { provide: LIVE_SOCKET_FACTORY, useValue: () => new FakeSocket() as unknown as WebSocket },
    ],
  });
  http = TestBed.inject(HttpTestingController);
  const me: Me = { id: 3, email: 'p@example.org', name: 'Priya Halvorsen', role, ownerId: role === 'owner' ? 1 : null };
  TestBed.inject(Session).signIn({ email: me.email, password: 'x' }).subscribe();
  http.expectOne('/api/auth/sign-in').flush(me);
  const fixture = TestBed.createComponent(UnitView);
  fixture.componentRef.setInput('id', '5');
  await fixture.whenStable();
  http.expectOne('/api/units/5').flush(UNIT);
  await fixture.whenStable();
  const asked: string[] = [];
  const answer = (r: TestRequest) => {
    const url = r.request.url;
    asked.push(url);
    if (url === '/api/sites/1') r.flush(SITE);
    else if (url === '/api/units/5/state') r.flush(state({ unitId: 5, serial: 'QHL-2405', dcPowerW: 287 }));
    else if (url === '/api/units/5/telemetry') r.flush([]);
    else if (url === '/api/sites/1/landscape/best') r.flush({ siteId: 1, at: '2026-06-21T10:00:00Z', wm2: 905 });
    else if (url === '/api/alarms') r.flush([alarmView({ id: 9, unitId: 5, serial: 'QHL-2405' })]);
    else if (url === '/api/units/5/commands') r.flush([]);
    else if (url === '/api/units/5/holds') r.flush({ unitId: 5, held: false, active: [], released: [] });
    else r.flush({ error: { code: 'not_found', message: 'Not here.' } }, { status: 404, statusText: 'Not Found' });
  };
  for (let round = 0; round < 3; round++) {
    for (const r of http.match(() => true)) answer(r);
    await fixture.whenStable();
  }
  return { el: fixture.nativeElement as HTMLElement, asked, fixture };
}

describe('UnitView for each role', () => {
  afterEach(() => {
    http?.verify();
    http = null;
  });

  it('shows an owner the unit read-only: live values, the last hour and its alarms, and no command, hold, scan or history controls', async () => {
    const { el, asked } = await renderUnitView('owner');
    expect(el.querySelector('[data-testid="read-only-note"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="live-power"]')!.textContent).toContain('287 W');
    expect(el.querySelector('bw-last-hour-panel')).not.toBeNull();
    expect(el.querySelector('[data-testid="alarm-9"]')).not.toBeNull();
    for (const panel of ['bw-command-panel', 'bw-hold-panel', 'bw-scan-panel', 'bw-command-history', 'bw-pointing-panel'])
      expect(el.querySelector(panel), panel).toBeNull();
    expect(el.querySelectorAll('[data-testid^="cmd-"]').length).toBe(0);
    expect(el.querySelector('[data-testid^="ack-"]')).toBeNull();
    expect([...el.querySelectorAll('button')].map((b) => b.textContent!.trim())).toEqual([]);
    // It asks only for what owners may read: no landscape, commands, holds or scans.
    expect(asked.filter((u) => /landscape$|commands|holds|scans/.test(u))).toEqual([]);
    expect(el.textContent).toContain('905 W/m²');
    expect(el.querySelector('a.back')!.textContent).toContain('Harbour Roof');
  });

  it('gives a technician the command panel and the history, and says DC power for the output', async () => {
    const { el, asked } = await renderUnitView('technician');
    expect(el.querySelector('[data-testid="read-only-note"]')).toBeNull();
    expect(el.querySelector('bw-command-panel')).not.toBeNull();
    expect(el.querySelector('bw-command-history')).not.toBeNull();
    expect(el.querySelector('[data-testid="site-tilt-link"]')).toBeNull(); // the site's detector tilt is the engineers'
    expect(asked).toContain('/api/units/5/commands');
    expect([...el.querySelectorAll('.values dt')].map((d) => d.textContent!.trim())).toContain('DC power');
  });

  it('sends new settings only after a confirmation naming the unit and the settings, with the cautions and the people-clear check', async () => {
    const { el, fixture } = await renderUnitView('engineer');
    expect(el.querySelector('[data-testid="site-tilt-link"] a')!.getAttribute('href')).toBe('/health-settings?site=1');
    const type = async (name: string, value: string) => {
      const input = el.querySelector(`[data-testid="settings-form"] input[name="${name}"]`) as HTMLInputElement;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    await type('detectorTiltDeg', '16.5');
    await type('deadbandWm2', '4');
    (el.querySelector('[data-testid="cmd-configure"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    const dialog = document.querySelector('mat-dialog-container')!;
    expect(dialog.textContent).toContain('Send new settings — QHL-2405?');
    expect(dialog.querySelector('[data-testid="command-description"]')!.textContent).toContain('detector tilt 16.5°');
    expect(dialog.querySelector('[data-testid="command-description"]')!.textContent).toContain('deadband 4 W/m²');
    expect(dialog.querySelector('[data-testid="command-caution"]')!.textContent).toContain('may start to move at once');
    expect(dialog.querySelector('[data-testid="command-caution"]')!.textContent).toContain('not a lockout');
    const confirm = dialog.querySelector('[data-testid="confirm"]') as HTMLButtonElement;
    expect(confirm.disabled).toBe(true);
    (dialog.querySelector('[data-testid="people-clear"] input') as HTMLInputElement).click();
    await fixture.whenStable();
    confirm.click();
    await new Promise((r) => setTimeout(r, 50)); // the dialog closes, then the view sends
    await fixture.whenStable();
    const post = http!.expectOne((r) => r.method === 'POST' && r.url === '/api/units/5/commands');
    expect(post.request.body).toEqual({ kind: 'configure', config: { detectorTiltDeg: 16.5, deadbandWm2: 4 }, confirm: true });
    post.flush({
      id: 'c1',
      unitId: 5,
      kind: 'configure',
      params: { config: { detectorTiltDeg: 16.5, deadbandWm2: 4 } },
      status: 'sent',
      reason: null,
      issuedBy: { id: 3, name: 'Priya Halvorsen' },
      issuedAt: '2026-06-21T10:00:00Z',
      sentAt: '2026-06-21T10:00:00Z',
      ackedAt: null,
      finishedAt: null,
      expiresAt: null,
    });
    await fixture.whenStable();
  });
});
