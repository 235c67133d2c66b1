import { Directive, input } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { MonthlyStatement, StatementFigures, StatementMonthList } from '../../../shared/contracts/statements';
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
    { month: '2026-12', partial: true },
    { month: '2026-11', partial: false },
  ],
};

const STATEMENT: MonthlyStatement = {
  siteId: 3,
  siteName: 'Harbour Roof',
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
};

describe('StatementPage', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open(month?: string) {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
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
