import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import type { Me, Role, Site } from '../../../shared/contracts/api';
import type { HealthSettingsHistory } from '../../../shared/contracts/alarms';
import type { ApplyDetectorTiltResult } from '../../../shared/contracts/detector-tilt';
import { Session } from '../auth/session';
import { LIVE_SOCKET_FACTORY } from '../live/live-connection';
import { FakeSocket } from '../testing/spec-fixtures';
import { tiltRecommendation } from '../testing/detector-tilt-fixtures';
import { siteSettings } from '../testing/health-settings-fixtures';
import { HealthSettingsPage } from './health-settings-page';

const SITE = { id: 1, name: 'Harbourside Library Roof', timeZone: 'Europe/Berlin' } as unknown as Site;
const NO_HISTORY: HealthSettingsHistory = { siteId: 1, total: 0, entries: [] };
let http: HttpTestingController;

async function render(role: Role, sites: Site[] | 'fail' = [SITE]) {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      provideRouter([]),
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      { provide: LIVE_SOCKET_FACTORY, useValue: () => new FakeSocket() as unknown as WebSocket },
    ],
  });
  http = TestBed.inject(HttpTestingController);
  const me: Me = { id: 2, email: 'p@example.org', name: 'Ravi Lindqvist', role, ownerId: null };
  TestBed.inject(Session).signIn({ email: me.email, password: 'x' }).subscribe();
  http.expectOne('/api/auth/sign-in').flush(me);
  const fixture = TestBed.createComponent(HealthSettingsPage);
  await fixture.whenStable();
  const list = http.expectOne('/api/sites');
  if (sites === 'fail') list.flush({ error: { code: 'unavailable', message: 'Down for a moment.' } }, { status: 503, statusText: 'x' });
  else list.flush(sites);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  return { fixture, el };
}

const settingsReq = () => http.expectOne('/api/sites/1/health-settings');
const historyReq = () => http.expectOne((r) => r.url === '/api/sites/1/health-settings/history');

describe('HealthSettingsPage', () => {
  afterEach(() => http.verify());

  it('shows a technician the thresholds and history read-only, without the detector tilt controls', async () => {
    const { fixture, el } = await render('technician');
    expect(el.querySelector('[data-testid="settings-loading"]')).not.toBeNull();
    settingsReq().flush(siteSettings({ stowGustMs: 16 }));
    historyReq().flush(NO_HISTORY);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="settings-read-only"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="value-stowGustMs"]')!.textContent).toContain('16 m/s');
    expect(el.querySelector('[data-testid="history-empty"]')).not.toBeNull();
    expect(el.querySelector('bw-detector-tilt-panel')).toBeNull();
  });

  it('saves an engineer’s change with its reason, shows the server’s field error when refused, and reloads the history', async () => {
    const { fixture, el } = await render('engineer');
    settingsReq().flush(siteSettings());
    historyReq().flush(NO_HISTORY);
    await fixture.whenStable();
    const type = async (testid: string, value: string) => {
      const input = el.querySelector(`[data-testid="${testid}"]`) as HTMLInputElement;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    await type('input-stowGustMs', '16');
    await type('settings-reason', 'Gusty roof edge');
    (el.querySelector('[data-testid="settings-save"]') as HTMLButtonElement).click();
    const put = http.expectOne('/api/sites/1/health-settings');
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({ stowGustMs: 16, reason: 'Gusty roof edge' });
    put.flush(
      {
        error: {
          code: 'validation_failed',
          message: 'The health settings have 1 invalid field(s): stowGustMs.',
          fields: { stowGustMs: 'Must be at most 17 here.' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="settings-save-problem"]')!.textContent).toContain('Not saved.');
    expect(el.querySelector('[data-testid="error-stowGustMs"]')!.textContent).toContain('Must be at most 17 here.');

    await type('input-stowGustMs', '17');
    (el.querySelector('[data-testid="settings-save"]') as HTMLButtonElement).click();
    const again = http.expectOne('/api/sites/1/health-settings');
    expect(again.request.body).toEqual({ stowGustMs: 17, reason: 'Gusty roof edge' });
    again.flush(siteSettings({ stowGustMs: 17 }));
    await fixture.whenStable();
    historyReq().flush({
      siteId: 1,
      total: 1,
      entries: [
        {
          at: '2026-06-21T10:00:00Z',
          by: { id: 2, name: 'Ravi Lindqvist' },
          reason: 'Gusty roof edge',
          changes: [{ key: 'stowGustMs', from: null, to: 17 }],
        },
      ],
    });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="settings-save-problem"]')).toBeNull();
    expect(el.querySelector('[data-testid="history-reason"]')!.textContent).toContain('Gusty roof edge');
    expect((el.querySelector('[data-testid="input-stowGustMs"]') as HTMLInputElement).value).toBe('17');
  });

  it('works the detector tilt out, confirms with the cautions, sends it and follows each unit’s answer', async () => {
    const { fixture, el } = await render('engineer');
    settingsReq().flush(siteSettings());
    historyReq().flush(NO_HISTORY);
    await fixture.whenStable();
    (el.querySelector('[data-testid="tilt-compute"]') as HTMLButtonElement).click();
    const get = http.expectOne((r) => r.url === '/api/sites/1/detector-tilt');
    expect(get.request.params.get('year')).toBe(String(new Date().getUTCFullYear()));
    get.flush(tiltRecommendation());
    await fixture.whenStable();
    (el.querySelector('[data-testid="tilt-apply"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    const dialog = document.querySelector('mat-dialog-container')!;
    expect(dialog.textContent).toContain('Send a detector tilt of 16.5° to Harbourside Library Roof?');
    expect(dialog.querySelector('[data-testid="command-caution"]')!.textContent).toContain('not a lockout');
    expect(dialog.textContent).toContain('I have made sure nobody is within reach of all 2 units.');
    const confirm = dialog.querySelector('[data-testid="confirm"]') as HTMLButtonElement;
    expect(confirm.disabled).toBe(true);
    (dialog.querySelector('[data-testid="people-clear"] input') as HTMLInputElement).click();
    await fixture.whenStable();
    confirm.click();
    await new Promise((r) => setTimeout(r, 50)); // the dialog closes, then the page sends
    await fixture.whenStable();
    const post = http.expectOne('/api/sites/1/detector-tilt');
    expect(post.request.method).toBe('POST');
    expect(post.request.body).toEqual({ detectorTiltDeg: 16.5, confirm: true });
    const result: ApplyDetectorTiltResult = {
      siteId: 1,
      detectorTiltDeg: 16.5,
      units: [
        { unitId: 11, serial: 'QHL-2401', commandId: 'c-11', status: 'sent', reason: null },
        { unitId: 12, serial: 'QHL-2402', commandId: 'c-12', status: 'queued', reason: null },
        { unitId: 13, serial: 'QHL-2403', commandId: null, status: 'skipped', reason: 'The unit is disabled: nothing was sent.' },
      ],
    };
    post.flush(result);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="tilt-summary"]')!.textContent).toContain('2 waiting for the unit · 1 disabled');
    FakeSocket.last!.push({ type: 'command', command: { id: 'c-11', unitId: 11, kind: 'configure', status: 'completed', reason: null } });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="tilt-status-QHL-2401"]')!.textContent).toContain('Done');
    expect(el.querySelector('[data-testid="tilt-summary"]')!.textContent).toContain('1 accepted · 1 waiting for the unit · 1 disabled');
  });

  it('has its loading, empty and error states', async () => {
    const failed = await render('engineer', 'fail');
    expect(failed.el.querySelector('[data-testid="settings-sites-problem"]')!.textContent).toContain('Down for a moment.');
    TestBed.resetTestingModule();
    const none = await render('engineer', []);
    expect(none.el.querySelector('[data-testid="settings-no-sites"]')).not.toBeNull();
    TestBed.resetTestingModule();
    const { fixture, el } = await render('engineer');
    settingsReq().flush({ error: { code: 'unavailable', message: 'Database busy.' } }, { status: 503, statusText: 'x' });
    historyReq().flush({ error: { code: 'unavailable', message: 'Database busy.' } }, { status: 503, statusText: 'x' });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="settings-problem"]')!.textContent).toContain('Database busy.');
  });
});
