import { Directive, input } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { StatementTrend, StatementTrendMonth } from '../../../shared/contracts/statements';
import { Portfolio } from './portfolio';

@Directive({ selector: '[echarts]' })
class ChartStub {
  readonly options = input<unknown>();
}

const month = (m: string, over: Partial<StatementTrendMonth> = {}): StatementTrendMonth => ({
  month: m,
  partial: false,
  hasData: true,
  energyKwh: 800,
  yfH: 100,
  pr: 0.81,
  availabilityTimeContractual: 0.985,
  availabilityEnergyContractual: 0.99,
  gainOverFixedPct: 31.4,
  gainOverSunPct: 4.2,
  completeness: 1,
  ...over,
});

describe('Portfolio', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open() {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    TestBed.overrideComponent(Portfolio, { remove: { imports: [NgxEchartsDirective] }, add: { imports: [ChartStub] } });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(Portfolio);
    await fixture.whenStable();
    return { fixture, el: fixture.nativeElement as HTMLElement };
  }

  it("shows each site's month so far and links to its statements; a site whose figures fail says so", async () => {
    const { fixture, el } = await open();
    http.expectOne('/api/sites').flush([
      { id: 2, name: 'Yard' },
      { id: 1, name: 'Harbour Roof' },
    ]);
    const trend: StatementTrend = {
      siteId: 1,
      siteName: 'Harbour Roof',
      timeZone: 'Europe/Berlin',
      months: [month('2026-11'), month('2026-12', { partial: true, energyKwh: 123.4 })],
    };
    http.expectOne('/api/sites/1/statement-trend').flush(trend);
    http
      .expectOne('/api/sites/2/statement-trend')
      .flush({ error: { code: 'unavailable', message: 'Down.' } }, { status: 503, statusText: 'x' });
    await fixture.whenStable();
    const articles = [...el.querySelectorAll('article')];
    expect(articles.map((a) => a.querySelector('h2')!.textContent!.trim())).toEqual(['Harbour Roof', 'Yard']);
    expect(articles[0]!.textContent).toContain('123 kWh');
    expect(articles[0]!.textContent).toContain('31.4 %');
    expect(articles[0]!.querySelector('a[href="/sites/1/statements"]')).not.toBeNull();
    expect(articles[1]!.querySelector('[role="alert"]')!.textContent).toContain('could not be loaded. Down.');
  });

  it('has an empty state without sites', async () => {
    const { fixture, el } = await open();
    http.expectOne('/api/sites').flush([]);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="portfolio-empty"]')!.textContent).toContain('No sites yet');
  });
});
