import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import type { Site, Unit } from '../../../shared/contracts/api';
import { SiteDetail } from './site-detail';

const SITE = {
  id: 1,
  name: 'Harbour Roof',
  timeZone: 'Europe/London',
  latitudeDeg: 53.4,
  longitudeDeg: -3,
  elevationM: 20,
  albedo: 0.2,
  indoor: false,
  unitCount: 1,
  ownerId: 1,
  ownerName: 'Quay Cooperative',
} as unknown as Site;
const UNIT = {
  id: 5,
  serial: 'QHL-2405',
  siteId: 1,
  ratedPowerWp: 400,
  detectorTiltDeg: 6,
  tiltMinDeg: 0,
  tiltMaxDeg: 85,
  azimuthMinDeg: 0,
  azimuthMaxDeg: 360,
  firmware: '2.4.1',
  disabled: false,
} as unknown as Unit;

describe('SiteDetail unit list', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('offers to load the units again when they could not be loaded, and then links each to its unit page', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(SiteDetail);
    fixture.componentRef.setInput('id', '1');
    await fixture.whenStable();
    http.expectOne('/api/sites/1').flush(SITE);
    await fixture.whenStable();
    http
      .expectOne((r) => r.url === '/api/units')
      .flush({ error: { code: 'unavailable', message: 'Down for a moment.' } }, { status: 503, statusText: 'Unavailable' });
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.textContent).toContain('Units could not be loaded. Down for a moment.');
    expect(el.querySelector('.no-data')!.textContent).not.toContain('no tracker units yet');
    (el.querySelector('[data-testid="units-retry"]') as HTMLButtonElement).click();
    http.expectOne((r) => r.url === '/api/units').flush([UNIT]);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="units-retry"]')).toBeNull();
    expect(el.querySelector('a[href="/units/5"]')!.textContent!.trim()).toBe('QHL-2405');
  });
});
