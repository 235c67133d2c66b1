import { describe, expect, it } from 'vitest';
import {
  analyseLandscape,
  blurLandscape,
  buildSky,
  capRadiusForDetectorTiltDeg,
  computeLandscape,
  detectorReadings,
  type SkyInput,
} from '../../shared/landscape/index';
import { skyFromFile } from '../../shared/sky-file/index';
import { analysePeaks, basinShares, gridGraph } from '../../shared/landscape/landscape-analysis';
import { seededRandom } from './seeded-random';
import { testSkies } from './test-skies';

const RAD = Math.PI / 180;

function randomSky(rnd: () => number): SkyInput {
  const types = ['isotropic', 'moon-spencer', ...Array.from({ length: 15 }, (_, i) => i + 1)] as const;
  const horizon: [number, number][] = [];
  if (rnd() < 0.6) {
    let az = rnd() * 20;
    while (az < 355) {
      horizon.push([az, rnd() * 35]);
      az += 5 + rnd() * 40;
    }
  }
  const reflectors =
    rnd() < 0.6
      ? [
          {
            normalAzimuthDeg: rnd() * 360,
            azimuthFromDeg: rnd() * 360,
            azimuthToDeg: 0,
            elevationFromDeg: 0,
            elevationToDeg: 10 + rnd() * 40,
            reflectance: 0.1 + rnd() * 0.3,
          },
        ].map((r) => ({
          ...r,
          azimuthToDeg: (r.azimuthFromDeg + 20 + rnd() * 60) % 360,
          normalAzimuthDeg: (r.azimuthFromDeg + 180 + (rnd() - 0.5) * 40 + 360) % 360,
        }))
      : [];
  return {
    sun: { azimuthDeg: rnd() * 360, elevationDeg: 5 + rnd() * 75, dniWm2: rnd() * 900 },
    dhiWm2: 30 + rnd() * 270,
    skyType: types[Math.floor(rnd() * types.length)]!,
    albedo: rnd() * 0.5,
    horizon,
    reflectors,
    lamps: rnd() < 0.3 ? [{ azimuthDeg: rnd() * 360, elevationDeg: rnd() * 80, irradianceWm2: rnd() * 100 }] : [],
  };
}

describe('fast landscape = brute-force quadrature within the stated error', () => {
  it('on 5 seeded random skies: mean relative error ≤ 1 %, max ≤ 3 % where E > 10 W/m²', () => {
    const rnd = seededRandom(42);
    for (let s = 0; s < 5; s++) {
      const input = randomSky(rnd);
      const sky = buildSky(input);
      const fast = computeLandscape(sky, { stepDeg: 6 });
      const brute = computeLandscape(sky, { stepDeg: 6, method: 'brute' });
      let sum = 0;
      let n = 0;
      let max = 0;
      brute.values.forEach((b, k) => {
        if (b <= 10) return;
        const r = Math.abs(fast.values[k]! - b) / b;
        sum += r;
        n++;
        max = Math.max(max, r);
      });
      expect(n, JSON.stringify(input)).toBeGreaterThan(100);
      expect(sum / n, JSON.stringify(input)).toBeLessThanOrEqual(0.01);
      expect(max, JSON.stringify(input)).toBeLessThanOrEqual(0.03);
    }
  });
});

describe('blurred landscape (cap average matched to the detector box)', () => {
  it('isotropic sky: the l = 1 term is scaled by (1 + cos r)/2, r = 2δ/√3', () => {
    const sky = buildSky({ sun: null, dhiWm2: 300, albedo: 0 });
    const land = computeLandscape(sky, { stepDeg: 10, tiltRangeDeg: [0, 180] });
    const delta = 15;
    const r = capRadiusForDetectorTiltDeg(delta) * RAD;
    const blurred = blurLandscape(land, delta);
    land.tiltsDeg.forEach((b, i) => {
      const expected = 150 * (1 + Math.cos(b * RAD) * ((1 + Math.cos(r)) / 2));
      expect(Math.abs(blurred.values[i * land.azimuthsDeg.length]! - expected)).toBeLessThan(0.05);
    });
  });

  const peakCounts = Object.entries(testSkies).map(([name, input]) => {
    const raw = computeLandscape(buildSky(input), { stepDeg: 2 });
    const graph = gridGraph(raw);
    const rawPeaks = analysePeaks(raw, undefined, graph);
    const counts = [];
    for (let d = 0.5; d <= 30; d += 0.5) counts.push(analysePeaks(blurLandscape(raw, d), rawPeaks.minProminenceWm2, graph).peaks.length);
    return { name, raw: rawPeaks.peaks.length, counts };
  });

  it('never has more local maxima than the raw landscape (test skies, δ = 0.5…30°)', () => {
    for (const { name, raw, counts } of peakCounts) for (const c of counts) expect(c, name).toBeLessThanOrEqual(raw);
  });

  it('a larger δ never has more peaks than a smaller one (test skies)', () => {
    for (const { name, counts } of peakCounts)
      for (let k = 1; k < counts.length; k++) expect(counts[k], name).toBeLessThanOrEqual(counts[k - 1]!);
  });

  it('the test skies include traps: the facade sky has two peaks that merge, the lamp atrium keeps two', () => {
    const facade = peakCounts.find((p) => p.name.startsWith('clear sky with a glass facade'))!;
    expect(facade.raw).toBe(2);
    expect(facade.counts[facade.counts.length - 1]).toBe(1);
    const lamps = peakCounts.find((p) => p.name.startsWith('atrium'))!;
    expect(lamps.raw).toBe(2);
    expect(lamps.counts[lamps.counts.length - 1]).toBe(2);
  });
});

describe('landscape analysis', () => {
  const facadeSky = buildSky(testSkies['clear sky with a glass facade reflecting the sun']!);
  it('finds the sun peak and the facade trap, with basin shares summing to 1', () => {
    const r = analyseLandscape(facadeSky, { stepDeg: 2, detectorTiltDeg: 5 });
    expect(r.localMaxima).toHaveLength(2);
    expect(r.globalMax.azimuthDeg).toBe(110); // facing the sun (azimuth 110°, elevation 20° → tilt ≈ 70°)
    expect(Math.abs(r.globalMax.tiltDeg - 70)).toBeLessThanOrEqual(2);
    const trap = r.localMaxima[1]!;
    expect(Math.abs(trap.azimuthDeg - 250)).toBeLessThanOrEqual(4); // the sun's image in the east-facing facade
    expect(trap.prominenceWm2).toBeGreaterThan(10);
    const total = r.localMaxima.reduce((a, m) => a + m.basinShare, 0);
    expect(Math.abs(total - 1)).toBeLessThan(1e-9);
    expect(trap.basinShare).toBeGreaterThan(0.05);
  });

  it('the smallest single-peak detector tilt is consistent with the peak counts on either side of it', () => {
    const r = analyseLandscape(facadeSky, { stepDeg: 2 });
    const d = r.minSinglePeakDetectorTiltDeg!;
    expect(d).not.toBeNull();
    const raw = computeLandscape(facadeSky, { stepDeg: 2 });
    const graph = gridGraph(raw);
    const count = (x: number) => analysePeaks(blurLandscape(raw, x), r.minProminenceWm2, graph).peaks.length;
    expect(count(d)).toBe(1);
    for (let x = 0.5; x < d; x += 0.5) expect(count(x)).toBeGreaterThan(1);
    // with that detector tilt every start ends at the global maximum
    const atD = analyseLandscape(facadeSky, { stepDeg: 2, detectorTiltDeg: d });
    expect(atD.localMaxima[0]!.basinShare).toBeCloseTo(1, 9);
  });

  it('returns null when no detector tilt up to the maximum removes the trap', () => {
    const r = analyseLandscape(buildSky(testSkies['atrium with two opposite lamps']!), { stepDeg: 3, maxDetectorTiltDeg: 12 });
    expect(r.localMaxima).toHaveLength(2);
    expect(r.minSinglePeakDetectorTiltDeg).toBeNull();
  });

  it('a single-peak sky gets 0.5° and one basin', () => {
    const r = analyseLandscape(buildSky(testSkies['CIE overcast']!), { stepDeg: 3 });
    expect(r.localMaxima).toHaveLength(1);
    expect(r.globalMax.tiltDeg).toBe(0); // overcast, dark ground: horizontal is best (physics.md §8 [SC])
    expect(r.localMaxima[0]!.basinShare).toBeCloseTo(1, 12);
    expect(r.minSinglePeakDetectorTiltDeg).toBe(0.5);
  });

  it('basin shares of a raw analysis sum to 1 for several detector tilts', () => {
    const raw = computeLandscape(facadeSky, { stepDeg: 3 });
    const a = analysePeaks(raw);
    for (const d of [0, 5, 15, 25]) {
      const shares = basinShares(a, blurLandscape(raw, d));
      expect(Math.abs([...shares.values()].reduce((x, y) => x + y, 0) - 1)).toBeLessThan(1e-9);
    }
  });

  it('rejects a bad grid step', () => {
    expect(() => computeLandscape(facadeSky, { stepDeg: 0 })).toThrow(/stepDeg: .*0 < step ≤ 10/);
    expect(() => computeLandscape(facadeSky, { stepDeg: 10.5 })).toThrow(/stepDeg/);
    expect(() => computeLandscape(facadeSky, { stepDeg: Number.NaN })).toThrow(/stepDeg/);
  });
});

describe('degenerate skies never produce NaN', () => {
  it('night, poles, sun at the zenith behind a full horizon, sun on the horizon, empty sky, sky-wide mirror', () => {
    const files: unknown[] = [
      { site: { latitudeDeg: 52, longitudeDeg: 4.5 }, time: '2026-12-21T23:00:00+01:00', skyType: 12 },
      { site: { latitudeDeg: 90, longitudeDeg: 0 }, time: '2026-06-21T12:00:00Z', skyType: 12 },
      { site: { latitudeDeg: -90, longitudeDeg: 0 }, time: '2026-06-21T12:00:00Z' },
      { sun: { azimuthDeg: 0, elevationDeg: 90, dniWm2: 900 }, dhiWm2: 100, skyType: 15, horizon: [[0, 90]] },
      { sun: { azimuthDeg: 360, elevationDeg: -5, dniWm2: 900 }, dhiWm2: 0, skyType: 7 },
      { sun: { azimuthDeg: 180, elevationDeg: 0, dniWm2: 900 }, ghiWm2: 50, skyType: 14, albedo: 1 },
      {},
      {
        sun: { azimuthDeg: 10, elevationDeg: 40, dniWm2: 500 },
        dhiWm2: 100,
        reflectors: [
          {
            normalAzimuthDeg: 0,
            normalElevationDeg: 90,
            azimuthFromDeg: 0,
            azimuthToDeg: 0,
            elevationFromDeg: -90,
            elevationToDeg: 90,
            reflectance: 1,
          },
        ],
      },
    ];
    for (const f of files) {
      const { sky } = skyFromFile(f);
      const report = analyseLandscape(sky, { stepDeg: 5, detectorTiltDeg: 10 });
      const text = JSON.stringify(report) + JSON.stringify(detectorReadings(sky, 0, 0, 10));
      expect(text, JSON.stringify(f)).not.toMatch(/NaN|Infinity/);
      expect(report.localMaxima.length, JSON.stringify(f)).toBeGreaterThanOrEqual(1);
      for (const v of computeLandscape(sky, { stepDeg: 5 }).values) expect(Number.isFinite(v) && v >= 0).toBe(true);
    }
  });
});
