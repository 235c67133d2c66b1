import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import type { Site, Unit } from '../../../shared/contracts/api';
import { alarmView } from '../testing/spec-fixtures';
import { DetectorReplay, replayRange } from './detector-replay';

const SITE = { id: 1, name: 'Harbourside Library Roof', timeZone: 'Europe/Berlin' } as unknown as Site;
const UNITS = [
  { id: 11, serial: 'QHL-2401', siteId: 1, disabled: false },
  { id: 12, serial: 'QHL-2402', siteId: 1, disabled: false },
  { id: 13, serial: 'QHL-2403', siteId: 1, disabled: true },
] as unknown as Unit[];
let http: HttpTestingController;

async function render(sites: Site[] | 'fail' = [SITE]) {
  TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
  http = TestBed.inject(HttpTestingController);
  const fixture = TestBed.createComponent(DetectorReplay);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  expect(el.querySelector('[data-testid="replay-sites-loading"]')).not.toBeNull();
  const req = http.expectOne('/api/sites');
  if (sites === 'fail') req.flush({ error: { code: 'unavailable', message: 'Down for a moment.' } }, { status: 503, statusText: 'x' });
  else req.flush(sites);
  await fixture.whenStable();
  const set = async (testid: string, value: string) => {
    const input = el.querySelector(`[data-testid="${testid}"]`) as HTMLInputElement;
    input.value = value;
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
  };
  return { fixture, el, set };
}

describe('replayRange', () => {
  it('turns a site-time day, start and hours into UTC instants (DST-aware), and refuses what the server would', () => {
    expect(replayRange('2026-06-21', '08:00', 6, 'Europe/Berlin')).toEqual({
      from: '2026-06-21T06:00:00.000Z',
      to: '2026-06-21T12:00:00.000Z',
    });
    expect(replayRange('2026-12-21', '08:00', 48, 'Europe/Berlin')).toEqual({
      from: '2026-12-21T07:00:00.000Z',
      to: '2026-12-23T07:00:00.000Z',
    });
    expect(replayRange('2026-06-21', '08:00', 49, 'Europe/Berlin')).toBeNull();
    expect(replayRange('2026-06-21', '08:00', 0, 'Europe/Berlin')).toBeNull();
    expect(replayRange('2026-06-21', '8 am', 6, 'Europe/Berlin')).toBeNull();
  });
});

describe('DetectorReplay', () => {
  afterEach(() => http.verify());

  it('runs the detectors over the chosen units and hours and shows the run beside the stored alarms', async () => {
    const { fixture, el, set } = await render();
    http.expectOne((r) => r.url === '/api/units' && r.params.get('siteId') === '1').flush(UNITS);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="replay-not-run"]')).not.toBeNull();
    // Enabled units are chosen to start with; the disabled one is not.
    expect((el.querySelector('[data-testid="replay-unit-QHL-2403"] input') as HTMLInputElement).checked).toBe(false);
    (el.querySelector('[data-testid="replay-unit-QHL-2402"] input') as HTMLInputElement).click();
    await set('replay-date', '2026-06-21');
    await set('replay-start', '10:00');
    await set('replay-hours', '2');
    expect(el.querySelector('[data-testid="replay-range"]')!.textContent).toContain('2026-06-21 08:00:00 UTC');
    (el.querySelector('[data-testid="replay-run"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    const run = http.expectOne('/api/detectors/run');
    expect(run.request.body).toEqual({ from: '2026-06-21T08:00:00.000Z', to: '2026-06-21T10:00:00.000Z', unitIds: [11] });
    expect(el.querySelector('[data-testid="replay-running"]')).not.toBeNull();
    run.flush({
      from: '2026-06-21T08:00:00.000Z',
      to: '2026-06-21T10:00:00.000Z',
      units: 1,
      reports: 1440,
      alarms: [alarmView({ id: -1, kind: 'trap', unitId: 11, serial: 'QHL-2401' })],
      stored: [],
    });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="replay-counts"]')!.textContent).toContain('1440 reports of 1 unit');
    expect(el.querySelector('[data-testid="verdict-QHL-2401-trap"]')!.textContent).toContain('Only the run');
  });

  it('keeps the run button off without units or with too many hours, and shows the server’s refusal', async () => {
    const { fixture, el, set } = await render();
    http.expectOne((r) => r.url === '/api/units').flush(UNITS);
    await fixture.whenStable();
    await set('replay-hours', '60');
    expect(el.querySelector('[data-testid="replay-range-problem"]')).not.toBeNull();
    expect((el.querySelector('[data-testid="replay-run"]') as HTMLButtonElement).disabled).toBe(true);
    await set('replay-hours', '6');
    (el.querySelector('[data-testid="replay-all"] input') as HTMLInputElement).click(); // all on
    await fixture.whenStable();
    (el.querySelector('[data-testid="replay-all"] input') as HTMLInputElement).click(); // all off
    await fixture.whenStable();
    expect((el.querySelector('[data-testid="replay-run"]') as HTMLButtonElement).disabled).toBe(true);
    (el.querySelector('[data-testid="replay-unit-QHL-2401"] input') as HTMLInputElement).click();
    await fixture.whenStable();
    (el.querySelector('[data-testid="replay-run"]') as HTMLButtonElement).click();
    http
      .expectOne('/api/detectors/run')
      .flush(
        { error: { code: 'validation_failed', message: 'The range is longer than 48 h.', fields: { to: 'At most 48 h after from.' } } },
        { status: 400, statusText: 'Bad Request' },
      );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="replay-problem"]')!.textContent).toContain(
      'The range is longer than 48 h. At most 48 h after from.',
    );
  });

  it('has its loading, empty and error states', async () => {
    const failed = await render('fail');
    expect(failed.el.querySelector('[data-testid="replay-sites-problem"]')!.textContent).toContain('Down for a moment.');
    TestBed.resetTestingModule();
    expect((await render([])).el.querySelector('[data-testid="replay-no-sites"]')).not.toBeNull();
    TestBed.resetTestingModule();
    const { fixture, el } = await render();
    http.expectOne((r) => r.url === '/api/units').flush([]);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="replay-no-units"]')).not.toBeNull();
  });
});
