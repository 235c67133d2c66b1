import { Directive, input } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import { signal } from '@angular/core';
import { Session } from '../auth/session';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { Role } from '../../../shared/contracts/api';
import type { MonthlyStatement, StatementFigures, StatementLockInfo, StatementMonthList } from '../../../shared/contracts/statements';
import { StatementPage } from './statement-page';

/** Stands in for the chart directive (no canvas in the test DOM); records the options it was given. */
@Directive({ selector: '[echarts]' })
class ChartStub {
  readonly options = input<unknown>();
}

const figures = (over: Partial<StatementFigures> = {}): StatementFigures => ({
  energyKwh: 1234.5,
  p0Kwp: 2.52,
  yfH: 489.9,
  hiKwhM2: 600,
  yrH: 600,
  pr: 0.8165,
  prStc: 0.861,
  completeness: 0.9965,
  modelledShare: 1,
  availability: {
    timeRaw: 0.9583,
    timeContractual: 0.9667,
    energyRaw: 0.97,
    energyContractual: 0.98,
    daylightH: 360,
    downH: 15,
    excludedH: 3,
    lostKwh: 4,
    excludedLostKwh: 0.8,
  },
  losses: {
    modelledBestKwh: 1300,
    measuredKwh: 1234.5,
    trappedKwh: 10,
    downtimeKwh: 40,
    heldKwh: 5,
    stowedKwh: 5,
    soilingKwh: 0,
    residualKwh: 5.5,
  },
  gains: { measuredKwh: 1234.5, fixedTwinKwh: 925.9, sunTwinKwh: 1172.8, gainOverFixedPct: 33.33, gainOverSunPct: 5.26 },
  ...over,
});

const MONTHS: StatementMonthList = {
  siteId: 3,
  siteName: 'Harbour Roof',
  timeZone: 'Europe/Berlin',
  months: [
    { month: '2026-12', partial: true, locked: false, version: null, restatementSuggested: false },
    { month: '2026-11', partial: false, locked: false, version: null, restatementSuggested: false },
  ],
};

const STATEMENT: MonthlyStatement = {
  siteId: 3,
  siteName: 'Harbour Roof',
  ownerName: 'Quillmoor Energy Cooperative',
  month: '2026-11',
  timeZone: 'Europe/Berlin',
  from: '2026-11-01T00:00:00+01:00',
  to: '2026-12-01T00:00:00+01:00',
  hours: 720,
  partial: false,
  generatedAt: '2026-12-03T07:00:00.000Z',
  site: figures(),
  units: [{ unitId: 7, serial: 'QHL-2401', ...figures() }],
  days: [
    {
      date: '2026-11-01',
      hours: 24,
      energyKwh: 40,
      hiKwhM2: 20,
      yfH: 15.9,
      pr: 0.79,
      completeness: 1,
      availabilityTimeRaw: 1,
      gainOverFixedPct: 30,
      gainOverSunPct: 5,
    },
  ],
  exclusions: [
    {
      serial: 'QHL-2401',
      from: '2026-11-10T10:00:00+01:00',
      to: '2026-11-10T11:00:00+01:00',
      minutes: 60,
      category: 'out-of-environmental-specification',
      source: 'wind-stow',
      ticketId: null,
      excused: true,
      lostKwh: 0.27,
    },
    {
      serial: 'QHL-2401',
      from: '2026-11-12T10:00:00+01:00',
      to: '2026-11-12T11:00:00+01:00',
      minutes: 60,
      category: 'requested-shutdown',
      source: 'ticket',
      ticketId: 41,
      excused: true,
      lostKwh: 0.27,
    },
  ],
  tickets: { opened: 2, resolved: 1, closed: 1, slaCompliancePct: 83.3, mttrH: 5.5 },
  assumptions: {
    energy: 'DC energy as measured by each unit (not the revenue meter).',
    gammaPctPerK: -0.37,
    daylightThresholdWm2: 50,
    model: ['Modelled irradiance: the landscape engine over the site survey.'],
    notes: [],
  },
  lock: null,
};

const V1 = { version: 1, lockedAt: '2026-12-03T05:00:00.000Z', lockedBy: null, reason: null, checksum: 'a'.repeat(64) };
const V2 = {
  version: 2,
  lockedAt: '2026-12-05T09:00:00.000Z',
  lockedBy: 'Ines Varga',
  reason: 'Late readings of 12 November',
  checksum: 'b'.repeat(64),
};
const LOCKED: StatementLockInfo = {
  ...V1,
  state: 'locked',
  restatementSuggestedAt: '2026-12-04T10:00:00.000Z',
  versions: [{ ...V1, state: 'locked' }],
};
const RESTATED: StatementLockInfo = {
  ...V2,
  state: 'locked',
  restatementSuggestedAt: null,
  versions: [
    { ...V2, state: 'locked' },
    { ...V1, state: 'superseded' },
  ],
};

describe('StatementPage', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open(month?: string, role: Role = 'owner') {
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: Session, useValue: { role: signal(role) } },
      ],
    });
    TestBed.overrideComponent(StatementPage, { remove: { imports: [NgxEchartsDirective] }, add: { imports: [ChartStub] } });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(StatementPage);
    fixture.componentRef.setInput('id', '3');
    if (month) fixture.componentRef.setInput('month', month);
    await fixture.whenStable();
    return { fixture, el: fixture.nativeElement as HTMLElement };
  }

  it('shows the chosen month: figures with units, availability, downtime with category and source, the CSV link', async () => {
    const { fixture, el } = await open('2026-11');
    http.expectOne('/api/sites/3/statements').flush(MONTHS);
    await fixture.whenStable();
    http.expectOne('/api/sites/3/statements/2026-11').flush(STATEMENT);
    await fixture.whenStable();
    expect(el.querySelector('h1')!.textContent).toContain('Monthly statement · Harbour Roof');
    expect(el.querySelector('[data-testid="energy"]')!.textContent!.trim()).toBe('1,234.5 kWh');
    expect(el.querySelector('[data-testid="pr"]')!.textContent!.trim()).toBe('81.7%');
    expect(el.querySelector('[data-testid="avail-time-raw"]')!.textContent!.trim()).toBe('95.83%');
    const rows = [...el.querySelectorAll('[data-testid="exclusions"] tbody tr')].map((r) => r.textContent!.replace(/\s+/g, ' ').trim());
    expect(rows[0]).toContain('Out of environmental specification');
    expect(rows[0]).toContain('Wind stow');
    expect(rows[1]).toContain('Shutdown at the owner’s request');
    expect(el.querySelector('[data-testid="exclusions"] a[href="/tickets/41"]')!.textContent).toContain('Ticket #41');
    expect(el.querySelector('[data-testid="csv-link"]')!.getAttribute('href')).toBe('/api/sites/3/statements/2026-11.csv');
    expect(el.querySelector('[data-testid="gains"]')!.textContent).toContain('33.3 %');
    expect(el.querySelector('[data-testid="assumptions"]')!.textContent).toContain('DC energy as measured');
    expect(el.querySelector('[data-testid="partial"]')).toBeNull();
  });

  it('opens the newest month when none is chosen, and says when the month is still running', async () => {
    const { fixture, el } = await open();
    http.expectOne('/api/sites/3/statements').flush(MONTHS);
    await fixture.whenStable();
    http.expectOne('/api/sites/3/statements/2026-12').flush({ ...STATEMENT, month: '2026-12', partial: true, exclusions: [] });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="partial"]')!.textContent).toContain('still running');
    expect(el.querySelector('[data-testid="no-exclusions"]')).not.toBeNull();
  });

  it('has an empty state without data, and 404 reads as not found', async () => {
    const { fixture, el } = await open();
    http.expectOne('/api/sites/3/statements').flush({ ...MONTHS, months: [] });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="statement-empty"]')!.textContent).toContain('No statement yet');
    TestBed.resetTestingModule();
    const again = await open('2026-11');
    http
      .expectOne('/api/sites/3/statements')
      .flush({ error: { code: 'not_found', message: 'Site not found.' } }, { status: 404, statusText: 'Not Found' });
    await again.fixture.whenStable();
    expect(again.el.querySelector('h1')!.textContent).toContain('Statement not found');
  });

  it('says an unlocked past month is not locked yet, and links the PDF', async () => {
    const { fixture, el } = await open('2026-11');
    http.expectOne('/api/sites/3/statements').flush(MONTHS);
    await fixture.whenStable();
    http.expectOne('/api/sites/3/statements/2026-11').flush(STATEMENT);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="not-locked"]')!.textContent).toContain('locks on the 3rd of the next month at 06:00 site time');
    expect(el.querySelector('[data-testid="pdf-link"]')!.getAttribute('href')).toBe('/api/sites/3/statements/2026-11.pdf');
    expect(el.querySelector('[data-testid="lock"]')).toBeNull();
  });

  it('shows a locked month to an owner: version, checksum, restatement suggested, and no restate form', async () => {
    const { fixture, el } = await open('2026-11');
    http.expectOne('/api/sites/3/statements').flush(MONTHS);
    await fixture.whenStable();
    http.expectOne('/api/sites/3/statements/2026-11').flush({ ...STATEMENT, lock: LOCKED });
    await fixture.whenStable();
    const lock = el.querySelector('[data-testid="lock"]')!.textContent!.replace(/\s+/g, ' ');
    expect(lock).toContain('Locked · version 1');
    expect(lock).toContain('(automatic lock)');
    expect(el.querySelector('[data-testid="checksum"]')!.textContent).toBe('a'.repeat(64));
    expect(el.querySelector('[data-testid="restatement-suggested"]')!.textContent).toContain('Restatement suggested');
    expect(el.querySelector('[data-testid="restate-form"]')).toBeNull();
    expect(el.querySelector('[data-testid="not-locked"]')).toBeNull();
  });

  it('lets an engineer restate with a reason, then lists both versions and opens the superseded one', async () => {
    const { fixture, el } = await open('2026-11', 'engineer');
    http.expectOne('/api/sites/3/statements').flush(MONTHS);
    await fixture.whenStable();
    http.expectOne('/api/sites/3/statements/2026-11').flush({ ...STATEMENT, lock: LOCKED });
    await fixture.whenStable();
    (el.querySelector('[data-testid="restate"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="restate-form"] [role="alert"]')!.textContent).toContain('Say why');
    const input = el.querySelector('[data-testid="restate-form"] input') as HTMLInputElement;
    input.value = 'Late readings of 12 November';
    input.dispatchEvent(new Event('input'));
    (el.querySelector('[data-testid="restate"]') as HTMLButtonElement).click();
    const post = http.expectOne('/api/sites/3/statements/2026-11/restate');
    expect(post.request.method).toBe('POST');
    expect(post.request.body).toEqual({ reason: 'Late readings of 12 November' });
    post.flush({ ...STATEMENT, lock: RESTATED });
    http.expectOne('/api/sites/3/statements').flush({
      ...MONTHS,
      months: [MONTHS.months[0]!, { month: '2026-11', partial: false, locked: true, version: 2, restatementSuggested: false }],
    });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="lock"]')!.textContent).toContain('Locked · version 2');
    expect(el.querySelector('[data-testid="lock-reason"]')!.textContent).toContain('Late readings of 12 November');
    expect(el.querySelector('[data-testid="restatement-suggested"]')).toBeNull();
    const versions = [...el.querySelectorAll('[data-testid="versions"] button')] as HTMLButtonElement[];
    expect(versions.map((b) => b.textContent!.replace(/\s+/g, ' ').trim())).toEqual([
      'Version 2 · in force · 2026-12-05T09:00:00.000Z',
      'Version 1 · superseded · 2026-12-03T05:00:00.000Z',
    ]);
    versions[1]!.click();
    await fixture.whenStable();
    http.expectOne('/api/sites/3/statements/2026-11?version=1').flush({ ...STATEMENT, lock: { ...RESTATED, ...V1, state: 'superseded' } });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="lock"]')!.textContent).toContain('superseded by a restatement');
    expect(el.querySelector('[data-testid="restate-form"]')).toBeNull(); // only the version in force is restated
    expect(el.querySelector('[data-testid="pdf-link"]')!.getAttribute('href')).toBe('/api/sites/3/statements/2026-11.pdf?version=1');
    expect(el.querySelector('[data-testid="csv-link"]')!.getAttribute('href')).toBe('/api/sites/3/statements/2026-11.csv?version=1');
  });

  it('shows an error with a retry when the statement cannot be loaded', async () => {
    const { fixture, el } = await open('2026-11');
    http.expectOne('/api/sites/3/statements').flush(MONTHS);
    await fixture.whenStable();
    http
      .expectOne('/api/sites/3/statements/2026-11')
      .flush({ error: { code: 'unavailable', message: 'Down for a moment.' } }, { status: 503, statusText: 'Unavailable' });
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('The statement could not be loaded. Down for a moment.');
  });
});
