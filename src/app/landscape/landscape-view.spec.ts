import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
import type { Me } from '../../../shared/contracts/api';
import type { SiteSurvey } from '../../../shared/contracts/survey';
import { Session } from '../auth/session';
import type { SiteLandscape } from '../../../shared/contracts/landscape';
import { readPalette } from '../live/tone-palette';
import { parseHorizonCsv } from './horizon-csv';
import { heatmapOptions, maximaMarks } from './landscape-charts';
import { LandscapeView, minutesLabel } from './landscape-view';
import { surveyProblems, surveyProblemText } from './survey-editor';

describe('horizon CSV import', () => {
  it('reads azimuth,elevation rows with a header, CRLF and quotes, sorted by azimuth', () => {
    const r = parseHorizonCsv('azimuth_deg,elevation_deg\r\n90,12.5\r\n"10",3\r\n\r\n180,0\r\n');
    expect(r).toEqual({
      ok: true,
      points: [
        [10, 3],
        [90, 12.5],
        [180, 0],
      ],
    });
  });

  it('keeps equal azimuths in file order (a vertical building edge)', () => {
    expect(parseHorizonCsv('60,10\n60,45\n0,5')).toEqual({
      ok: true,
      points: [
        [0, 5],
        [60, 10],
        [60, 45],
      ],
    });
  });

  it('reports every bad row by its line number and returns no points', () => {
    const r = parseHorizonCsv('azimuth,elevation\n10,5\n370,5\nabc,4\n20\n30,95\n40,-1');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => p.line)).toEqual([3, 4, 5, 6, 7]);
    expect(r.problems[0]!.message).toMatch(/azimuth 370/);
    expect(r.problems[1]!.message).toMatch(/not a number/);
    expect(r.problems[2]!.message).toMatch(/expected 2 values/);
    expect(r.problems[3]!.message).toMatch(/elevation 95/);
  });

  it('refuses an empty file', () => {
    expect(parseHorizonCsv('azimuth,elevation\n')).toEqual({
      ok: false,
      problems: [{ line: 1, message: 'the file has no azimuth, elevation rows' }],
    });
  });
});

describe('survey editor checks', () => {
  const base: SiteSurvey = {
    skyType: 'isotropic',
    horizon: [
      [0, 5],
      [90, 10],
    ],
    reflectors: [],
    lamps: [],
  };
  it('accepts a good survey and names bad points and facades', () => {
    expect(surveyProblems(base)).toEqual({});
    const bad = surveyProblems({
      ...base,
      horizon: [
        [90, 5],
        [10, 100],
      ],
      reflectors: [
        {
          normalAzimuthDeg: 90,
          normalElevationDeg: 0,
          azimuthFromDeg: 1,
          azimuthToDeg: 2,
          elevationFromDeg: 0,
          elevationToDeg: 5,
          reflectance: 1.5,
        },
      ],
    });
    expect(Object.keys(bad).sort()).toEqual(['horizon.1', 'reflectors.0.reflectance']);
    // Shown as the form names them, counted from 1 like its "Facade 1" and the horizon's rows.
    expect(Object.entries(bad).map(([path, m]) => surveyProblemText(path, m))).toEqual([
      'Horizon point 2: Elevation must be from 0 to 90°.',
      'Facade 1, reflectance: Reflectance must be from 0 to 1.',
    ]);
    expect(surveyProblemText('horizon.3.0', 'azimuth must be from 0 to under 360°')).toBe(
      'Horizon point 4, azimuth: azimuth must be from 0 to under 360°',
    );
    expect(surveyProblemText('lamps.0.irradianceWm2', 'must be in [0, 10000] W/m²')).toBe('Lamp 1, irradiance: must be in [0, 10000] W/m²');
  });
});

describe('landscape view without sites', () => {
  let http: HttpTestingController;

  async function render(role: Me['role']) {
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        provideEchartsCore({ echarts: () => new Promise<never>(() => undefined) }),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Session).signIn({ email: 'a@example.org', password: 'x' }).subscribe();
    http.expectOne('/api/auth/sign-in').flush({ id: 1, email: 'a@example.org', name: 'Ada Kestrel', role, ownerId: null });
    const fixture = TestBed.createComponent(LandscapeView);
    await fixture.whenStable();
    return fixture;
  }

  afterEach(() => http.verify());

  it('says there are no sites yet, and offers admins the way to add one', async () => {
    const fixture = await render('admin');
    http.expectOne('/api/sites').flush([]);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('[data-testid="landscape-no-sites"] h2')!.textContent).toBe('No sites yet');
    expect(el.querySelector('[data-testid="landscape-no-sites"] a')!.getAttribute('href')).toBe('/admin/sites');
    expect(el.querySelector('[data-testid="landscape-site"]')).toBeNull();
  });

  it('tells an engineer the same without the admin link, and offers a retry when the sites cannot be loaded', async () => {
    const fixture = await render('engineer');
    http
      .expectOne('/api/sites')
      .flush({ error: { code: 'unavailable', message: 'Down for a moment.' } }, { status: 503, statusText: 'Unavailable' });
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('[data-testid="landscape-sites-problem"]')!.textContent).toContain(
      'The sites could not be loaded. Down for a moment.',
    );
    (el.querySelector('[data-testid="landscape-sites-problem"] button') as HTMLButtonElement).click();
    http.expectOne('/api/sites').flush([]);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="landscape-sites-problem"]')).toBeNull();
    expect(el.querySelector('[data-testid="landscape-no-sites"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="landscape-no-sites"] a')).toBeNull();
  });
});

describe('landscape view', () => {
  const l: SiteLandscape = {
    siteId: 1,
    at: '2026-06-21T07:00:00Z',
    sun: { azimuthDeg: 90, elevationDeg: 30 },
    magnitudeSource: 'clear sky',
    stepDeg: 45,
    detectorTiltDeg: 4,
    grid: {
      tiltsDeg: [0, 45, 90],
      azimuthsDeg: [0, 90, 180, 270],
      values: [1, 2, 3, 4, 5, 600, 7, 8, 9, 10, 11, 300],
      blurred: [1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 3],
    },
    globalMax: { tiltDeg: 45, azimuthDeg: 90, wm2: 600 },
    localMaxima: [
      { tiltDeg: 45, azimuthDeg: 90, wm2: 600, prominenceWm2: 590, basinShare: 0.7 },
      { tiltDeg: 90, azimuthDeg: 270, wm2: 300, prominenceWm2: 289, basinShare: 0.3 },
    ],
    minSinglePeakDetectorTiltDeg: 12,
    minProminenceWm2: 3,
  };

  it('marks the global peak and the lesser ones differently, with their basins', () => {
    const m = maximaMarks(l);
    expect(m.map((x) => [x.best, x.name])).toEqual([
      [true, 'Modelled best (global peak)'],
      [false, 'Lesser peak 1'],
    ]);
  });

  it('flags the peak within one grid step of the best, which is searched more finely than the grid', () => {
    const m = maximaMarks({ ...l, globalMax: { tiltDeg: 46, azimuthDeg: 89, wm2: 601 } });
    expect(m.map((x) => [x.best, x.name])).toEqual([
      [true, 'Modelled best (global peak)'],
      [false, 'Lesser peak 1'],
    ]);
  });

  it('gives a best on the travel limit its own row, with no basin or prominence, when no peak holds it', () => {
    const m = maximaMarks({ ...l, globalMax: { tiltDeg: 85, azimuthDeg: 180, wm2: 640 } });
    expect(m.map((x) => [x.best, x.name, x.tiltDeg, x.basinShare, x.prominenceWm2])).toEqual([
      [true, 'Modelled best (at the travel limit)', 85, null, null],
      [false, 'Lesser peak 1', 45, 0.7, 590],
      [false, 'Lesser peak 2', 90, 0.3, 289],
    ]);
  });

  it('draws the grid as a heat map over azimuth × tilt with the peaks and the sun on their cells', () => {
    const o = heatmapOptions(l, 'values', readPalette()) as {
      series: { type: string; name: string; data: unknown[] }[];
      visualMap: { max: number };
    };
    const heat = o.series[0]!;
    expect(heat.type).toBe('heatmap');
    expect(heat.data).toHaveLength(12);
    expect(heat.data[5]).toEqual([1, 1, 600]);
    const best = o.series.find((s) => s.name === 'Modelled best')!;
    expect((best.data[0] as { value: number[] }).value).toEqual([1, 1]);
    const lesser = o.series.find((s) => s.name === 'Lesser peak')!;
    expect((lesser.data[0] as { value: number[] }).value).toEqual([3, 2]);
    const sun = o.series.find((s) => s.name === 'Facing the sun')!;
    expect((sun.data[0] as { value: number[] }).value).toEqual([1, 1]); // tilt 60° snaps to the 45° row
    expect(o.visualMap.max).toBe(600);
    const blurred = heatmapOptions(l, 'blurred', readPalette()) as { series: { name: string }[] };
    expect(blurred.series.map((s) => s.name)).toEqual(['Blurred irradiance', 'Facing the sun']);
  });

  it('labels slider minutes as site clock time', () => {
    expect(minutesLabel(0)).toBe('00:00');
    expect(minutesLabel(13 * 60 + 45)).toBe('13:45');
  });
});
