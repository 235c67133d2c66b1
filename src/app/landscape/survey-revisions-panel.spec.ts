import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import type { Me, Site } from '../../../shared/contracts/api';
import type { SurveyRevision, SurveyRevisionParameter } from '../../../shared/contracts/survey-revisions';
import { Session } from '../auth/session';
import { changeText, errorText, statusOf, SurveyRevisionsPanel } from './survey-revisions-panel';

const site: Site = {
  id: 7,
  ownerId: 1,
  ownerName: 'Quillmoor Energy Cooperative',
  name: 'Harbourside Library Roof',
  latitudeDeg: 53.54,
  longitudeDeg: 9.99,
  elevationM: 24,
  timeZone: 'Europe/Berlin',
  albedo: 0.373,
  indoor: false,
  unitCount: 6,
};
const survey = { skyType: 12 as const, horizon: [[0, 6] as [number, number]], reflectors: [], lamps: [] };
const param = (over: Partial<SurveyRevisionParameter>): SurveyRevisionParameter => ({
  key: 'reflectors.0.reflectance',
  kind: 'reflectance',
  label: 'Facade 1 reflectance',
  unit: '',
  before: 0.251,
  after: 0.369,
  uncertainty: 0.003,
  bounds: [0, 0.551],
  status: 'fitted',
  ...over,
});
const revision = (over: Partial<SurveyRevision> = {}): SurveyRevision => ({
  id: 31,
  siteId: 7,
  version: 3,
  state: 'proposed',
  proposedAt: '2026-06-12T11:00:00.000Z',
  proposedBy: { id: 2, name: 'Ines Varga' },
  decidedAt: null,
  decidedBy: null,
  reason: null,
  parameters: [
    param({}),
    param({
      key: 'reflectors.0.normalAzimuthDeg',
      kind: 'facadeAzimuth',
      label: 'Facade 1 azimuth (normal)',
      unit: '°',
      before: 94.8,
      after: 90.4,
      uncertainty: 0.1,
      bounds: [79.8, 109.8],
    }),
    param({
      key: 'horizon.0-30',
      kind: 'horizonSector',
      label: 'Horizon 0–30° (mean height)',
      unit: '°',
      before: 10.3,
      after: 10.3,
      uncertainty: null,
      bounds: [0.3, 20.3],
      status: 'not-observable',
    }),
    param({
      key: 'albedo',
      kind: 'albedo',
      label: 'Ground albedo',
      before: 0.373,
      after: 0.573,
      uncertainty: null,
      bounds: [0.173, 0.573],
      status: 'at-bound',
    }),
    param({
      key: 'station.scale',
      kind: 'stationScale',
      label: 'Weather-station scale (not part of the survey)',
      before: 1,
      after: 1.054,
      uncertainty: 0.003,
      bounds: [0.8, 1.2],
    }),
  ],
  modelError: {
    before: { meanAbsWm2: 31.6, globalMaxErrorDeg: 11.6 },
    after: { meanAbsWm2: 35.3, globalMaxErrorDeg: 8.4 },
    afterStationScaled: { meanAbsWm2: 12.1, globalMaxErrorDeg: 8.4 },
  },
  checkError: {
    scans: 2,
    before: { meanAbsWm2: 22.9, globalMaxErrorDeg: 2.2 },
    after: { meanAbsWm2: 28.2, globalMaxErrorDeg: 1 },
    afterStationScaled: { meanAbsWm2: 9, globalMaxErrorDeg: 1 },
  },
  fit: { scans: 9, scansLeftOut: 3, samples: 399, iterations: 20, converged: true, residualVariance: 0.5, sources: [] },
  baseSurvey: survey,
  baseAlbedo: 0.373,
  proposedSurvey: survey,
  proposedAlbedo: 0.573,
  outcome: null,
  ...over,
});

describe('survey revision wording', () => {
  it('shows surveyed → proposed ± one standard error, and "unchanged" for what stays as surveyed', () => {
    expect(changeText(param({}))).toBe('0.251 → 0.369 ± 0.003');
    expect(changeText(param({ kind: 'facadeAzimuth', unit: '°', before: 94.8, after: 90.4, uncertainty: 0.13 }))).toBe(
      '94.8° → 90.4° ± 0.1°',
    );
    expect(changeText(param({ status: 'not-confirmed', after: 0.251, uncertainty: null }))).toBe('0.251 (unchanged)');
    expect(changeText(param({ status: 'at-bound', after: 0.551, uncertainty: null }))).toBe('0.251 → 0.551');
  });

  it('names every status in words beside its icon', () => {
    expect(statusOf(param({ status: 'at-bound' })).text).toMatch(/At its bound/);
    expect(statusOf(param({ status: 'not-observable' }))).toEqual({
      icon: 'visibility_off',
      text: 'Not seen by these scans: stays as surveyed',
    });
    expect(statusOf(param({ status: 'not-confirmed' })).text).toMatch(/held-out scans/);
  });

  it('gives the model error before and after with the brightest-orientation error when there is one', () => {
    expect(errorText({ meanAbsWm2: 54.4, globalMaxErrorDeg: 26.1 }, { meanAbsWm2: 37.1, globalMaxErrorDeg: 23.4 })).toBe(
      '54.4 → 37.1 W/m²; brightest orientation 26.1° → 23.4° off',
    );
    expect(errorText({ meanAbsWm2: 5, globalMaxErrorDeg: null }, { meanAbsWm2: 4, globalMaxErrorDeg: null })).toBe('5 → 4 W/m²');
  });
});

describe('proposed survey corrections panel', () => {
  let http: HttpTestingController;
  const list = `/api/sites/${site.id}/survey-revisions`;

  async function render(role: Me['role']) {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Session).signIn({ email: 'a@example.org', password: 'x' }).subscribe();
    http
      .expectOne('/api/auth/sign-in')
      .flush({ id: 2, email: 'a@example.org', name: 'Ines Varga', role, ownerId: role === 'owner' ? 1 : null });
    const fixture = TestBed.createComponent(SurveyRevisionsPanel);
    fixture.componentRef.setInput('site', site);
    await fixture.whenStable();
    return fixture;
  }
  const el = (f: { nativeElement: unknown }) => f.nativeElement as HTMLElement;
  const text = (f: { nativeElement: unknown }, id: string) =>
    el(f).querySelector(`[data-testid="${id}"]`)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;

  afterEach(() => http.verify());

  it('shows an engineer each correction with its bounds and status, the model error before and after, and the station apart', async () => {
    const f = await render('engineer');
    http.expectOne(list).flush([
      revision(),
      revision({
        id: 30,
        version: 2,
        state: 'rejected',
        decidedBy: { id: 3, name: 'Ada Kestrel' },
        decidedAt: '2026-06-11T09:00:00Z',
        reason: 'Facade re-measured',
      }),
    ]);
    await f.whenStable();
    const rows = [...el(f).querySelectorAll('[data-testid="revision-parameters"] tbody tr')].map((r) =>
      [...r.children].map((c) => c.textContent!.trim()),
    );
    expect(rows).toEqual([
      ['Facade 1 reflectance', '0.251 → 0.369 ± 0.003', '0.000 … 0.551', 'check_circleFitted'],
      ['Facade 1 azimuth (normal)', '94.8° → 90.4° ± 0.1°', '79.8° … 109.8°', 'check_circleFitted'],
      ['Horizon 0–30° (mean height)', '10.3° (unchanged)', '0.3° … 20.3°', 'visibility_offNot seen by these scans: stays as surveyed'],
      [
        'Ground albedo',
        '0.373 → 0.573',
        '0.173 … 0.573',
        'vertical_align_topAt its bound: the scans want more than the fit allows; re-survey it',
      ],
    ]);
    expect(text(f, 'revision-errors')).toContain('31.6 → 35.3 W/m²; brightest orientation 11.6° → 8.4° off');
    expect(text(f, 'revision-errors')).toContain('On 2 held-out scans the fit did not see 22.9 → 28.2 W/m²');
    expect(text(f, 'revision-errors')).toContain('worse than the survey');
    expect(text(f, 'station-scale')).toContain('1.054 × as it reports (± 0.003). Accepting does not change the station');
    expect(text(f, 'open-revision')).toContain(
      'Revision 3, proposed 2026-06-12 11:00 UTC by Ines Varga, from 9 scans (399 readings; 3 left out',
    );
    expect(text(f, 'revision-history')).toBe('blockRevision 2: Rejected by Ada Kestrel, 2026-06-11 09:00 UTC — “Facade re-measured”');
  });

  it('accepts only with a reason, then tells the screen the survey changed', async () => {
    const f = await render('engineer');
    http.expectOne(list).flush([revision()]);
    await f.whenStable();
    const accepted: SurveyRevision[] = [];
    f.componentInstance.accepted.subscribe((r) => accepted.push(r));
    (el(f).querySelector('[data-testid="accept-revision"]') as HTMLButtonElement).click();
    await f.whenStable();
    expect(el(f).querySelector('.problem-hint')!.textContent).toContain('Say why you accept it');
    http.expectNone(`${list}/31/accept`);

    const input = el(f).querySelector('[data-testid="revision-reason"]') as HTMLInputElement;
    input.value = 'Matches the scans of 10 June';
    input.dispatchEvent(new Event('input'));
    (el(f).querySelector('[data-testid="accept-revision"]') as HTMLButtonElement).click();
    const req = http.expectOne(`${list}/31/accept`);
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ reason: 'Matches the scans of 10 June' });
    const done = revision({ state: 'accepted', outcome: { trapAlarmsReassessed: 2, trapAlarmsCleared: 1 } });
    req.flush(done);
    http.expectOne(list).flush([done]);
    await f.whenStable();
    expect(accepted.map((r) => r.id)).toEqual([31]);
    expect(el(f).querySelector('[data-testid="open-revision"]')).toBeNull();
    expect(text(f, 'no-open-revision')).toBe('No proposal is open.');
  });

  it('rejects with a reason and leaves the survey alone', async () => {
    const f = await render('admin');
    http.expectOne(list).flush([revision()]);
    await f.whenStable();
    const accepted: SurveyRevision[] = [];
    f.componentInstance.accepted.subscribe((r) => accepted.push(r));
    const input = el(f).querySelector('[data-testid="revision-reason"]') as HTMLInputElement;
    input.value = 'Facade re-measured next week';
    input.dispatchEvent(new Event('input'));
    (el(f).querySelector('[data-testid="reject-revision"]') as HTMLButtonElement).click();
    http.expectOne(`${list}/31/reject`).flush(revision({ state: 'rejected' }));
    http.expectOne(list).flush([revision({ state: 'rejected' })]);
    await f.whenStable();
    expect(accepted).toEqual([]);
  });

  it('says why no proposal was made when there are too few scans, and shows the empty state', async () => {
    const f = await render('engineer');
    http.expectOne(list).flush([]);
    await f.whenStable();
    expect(text(f, 'no-revisions')).toMatch(/at least three complete daylight scans/);
    (el(f).querySelector('[data-testid="propose-revision"]') as HTMLButtonElement).click();
    http
      .expectOne(`${list}/propose`)
      .flush(
        { error: { code: 'too_few_scans', message: 'A survey revision needs at least 3 complete daylight scans; there is 1.' } },
        { status: 422, statusText: 'Unprocessable' },
      );
    await f.whenStable();
    expect(text(f, 'propose-problem')).toBe(
      'infoNo proposal was made. A survey revision needs at least 3 complete daylight scans; there is 1.',
    );
  });

  it('offers nothing to accept when the scans confirm no correction', async () => {
    const f = await render('engineer');
    const unchanged = revision().parameters.map((p) =>
      p.kind === 'stationScale' ? p : { ...p, after: p.before, uncertainty: null, status: 'not-confirmed' as const },
    );
    http.expectOne(list).flush([revision({ parameters: unchanged })]);
    await f.whenStable();
    expect(text(f, 'nothing-changes')).toMatch(/confirm no correction/);
    expect((el(f).querySelector('[data-testid="accept-revision"]') as HTMLButtonElement).disabled).toBe(true);
    expect((el(f).querySelector('[data-testid="reject-revision"]') as HTMLButtonElement).disabled).toBe(false);
  });

  it('lets a technician read proposals but not propose or decide', async () => {
    const f = await render('technician');
    http.expectOne(list).flush([revision()]);
    await f.whenStable();
    expect(el(f).querySelector('[data-testid="open-revision"]')).not.toBeNull();
    expect(el(f).querySelector('[data-testid="propose-revision"]')).toBeNull();
    expect(el(f).querySelector('[data-testid="accept-revision"]')).toBeNull();
  });

  for (const role of ['owner', 'crew'] as const) {
    it(`shows ${role}s nothing and asks the server nothing`, async () => {
      const f = await render(role);
      http.expectNone(list);
      expect(el(f).querySelector('[data-testid="survey-revisions"]')).toBeNull();
    });
  }
});
