import { describe, expect, it } from 'vitest';
import { SURVEY_ERROR, parseSurveyErrorLevel, perturbSurvey, stationError, type SurveyedSite } from '../../simulator/survey-error';

const SITE: SurveyedSite = {
  albedo: 0.3,
  survey: {
    skyType: 12,
    horizon: [
      [0, 6],
      [100, 46],
      [170, 0],
      [300, 89],
    ],
    reflectors: [
      {
        normalAzimuthDeg: 358,
        normalElevationDeg: 0,
        azimuthFromDeg: 200,
        azimuthToDeg: 300,
        elevationFromDeg: 1,
        elevationToDeg: 42,
        reflectance: 0.9,
      },
      {
        normalAzimuthDeg: 180,
        normalElevationDeg: 0,
        azimuthFromDeg: 300,
        azimuthToDeg: 60,
        elevationFromDeg: 1,
        elevationToDeg: 45,
        reflectance: 0.3,
      },
    ],
    lamps: [{ azimuthDeg: 40, elevationDeg: 35, irradianceWm2: 120 }],
  },
};

/** Smallest angle between two azimuths [°]. */
const apart = (a: number, b: number) => Math.abs(((a - b + 540) % 360) - 180);

describe('survey error: the survey the model is given', () => {
  it('is the same for the same seed and level, and differs between seeds', () => {
    expect(perturbSurvey(SITE, 'high', 7)).toEqual(perturbSurvey(SITE, 'high', 7));
    expect(perturbSurvey(SITE, 'high', 7)).not.toEqual(perturbSurvey(SITE, 'high', 8));
  });

  it('changes nothing at level none, and leaves the input alone', () => {
    const before = structuredClone(SITE);
    expect(perturbSurvey(SITE, 'none', 3)).toEqual(SITE);
    perturbSurvey(SITE, 'high', 3);
    expect(SITE).toEqual(before);
  });

  it.each(['low', 'high'] as const)('stays within the %s bounds over many seeds, and uses most of them', (level) => {
    const b = SURVEY_ERROR[level];
    let maxHorizon = 0;
    let maxAz = 0;
    let maxRefl = 0;
    let maxAlbedo = 0;
    for (let seed = 0; seed < 300; seed++) {
      const p = perturbSurvey(SITE, level, seed);
      p.survey.horizon.forEach(([a, e], i) => {
        const [a0, e0] = SITE.survey.horizon[i]!;
        expect(a).toBe(a0);
        expect(e).toBeGreaterThanOrEqual(0);
        expect(e).toBeLessThanOrEqual(90);
        expect(Math.abs(e - e0)).toBeLessThanOrEqual(b.horizonDeg);
        if (e0 > b.horizonDeg && e0 < 90 - b.horizonDeg) maxHorizon = Math.max(maxHorizon, Math.abs(e - e0));
      });
      p.survey.reflectors.forEach((f, i) => {
        const f0 = SITE.survey.reflectors[i]!;
        expect(f.normalAzimuthDeg).toBeGreaterThanOrEqual(0);
        expect(f.normalAzimuthDeg).toBeLessThan(360);
        expect(apart(f.normalAzimuthDeg, f0.normalAzimuthDeg)).toBeLessThanOrEqual(b.facadeAzimuthDeg + 1e-9);
        maxAz = Math.max(maxAz, apart(f.normalAzimuthDeg, f0.normalAzimuthDeg));
        expect(f.reflectance).toBeLessThanOrEqual(1);
        expect(Math.abs(f.reflectance / f0.reflectance - 1)).toBeLessThanOrEqual(b.reflectanceFraction + 1e-9);
        if (f0.reflectance < 0.5) maxRefl = Math.max(maxRefl, Math.abs(f.reflectance / f0.reflectance - 1));
        expect({ ...f, normalAzimuthDeg: 0, reflectance: 0 }).toEqual({ ...f0, normalAzimuthDeg: 0, reflectance: 0 });
      });
      expect(Math.abs(p.albedo - SITE.albedo)).toBeLessThanOrEqual(b.albedo + 1e-12);
      maxAlbedo = Math.max(maxAlbedo, Math.abs(p.albedo - SITE.albedo));
      expect(p.survey.lamps).toEqual(SITE.survey.lamps);
      expect(p.survey.skyType).toBe(12);
    }
    // Uniform on the whole range: 300 draws come within 5 % of each bound.
    expect(maxHorizon).toBeGreaterThan(0.95 * b.horizonDeg);
    expect(maxAz).toBeGreaterThan(0.95 * b.facadeAzimuthDeg);
    expect(maxRefl).toBeGreaterThan(0.95 * b.reflectanceFraction);
    expect(maxAlbedo).toBeGreaterThan(0.95 * b.albedo);
  });

  it('errs the same way at low and high for one seed, high further', () => {
    const lo = perturbSurvey(SITE, 'low', 11);
    const hi = perturbSurvey(SITE, 'high', 11);
    const dLo = lo.albedo - SITE.albedo;
    const dHi = hi.albedo - SITE.albedo;
    expect(Math.sign(dLo)).toBe(Math.sign(dHi));
    expect(dHi / dLo).toBeCloseTo(SURVEY_ERROR.high.albedo / SURVEY_ERROR.low.albedo, 9);
  });

  it('refuses an unknown level by name', () => {
    expect(() => parseSurveyErrorLevel('medium')).toThrow(/none, low, high.*"medium"/);
    expect(() => perturbSurvey(SITE, 'medium' as never, 1)).toThrow(/survey error/);
  });
});

describe('survey error: the station readings the model is given', () => {
  it('has a gain within the bound per quantity, noise per reading, DHI kept ≤ GHI, and repeats per seed', () => {
    for (let seed = 0; seed < 50; seed++) {
      const s = stationError('high', seed);
      expect(Math.abs(s.ghiGain - 1)).toBeLessThanOrEqual(SURVEY_ERROR.high.stationGainFraction);
      expect(Math.abs(s.dhiGain - 1)).toBeLessThanOrEqual(SURVEY_ERROR.high.stationGainFraction);
    }
    const a = stationError('low', 5);
    const b = stationError('low', 5);
    const reads = [1, 2, 3].map(() => a.read({ ghiWm2: 500, dhiWm2: 499 }));
    expect([1, 2, 3].map(() => b.read({ ghiWm2: 500, dhiWm2: 499 }))).toEqual(reads);
    expect(new Set(reads.map((r) => r.ghiWm2)).size).toBe(3);
    for (const r of reads) {
      expect(r.dhiWm2!).toBeLessThanOrEqual(r.ghiWm2);
      // gain ±3 % and noise σ 1 %: within 8 % (5σ) of the true reading
      expect(Math.abs(r.ghiWm2 / 500 - 1)).toBeLessThan(0.08);
    }
    expect(a.read({ ghiWm2: 300, dhiWm2: null }).dhiWm2).toBeNull();
    expect(stationError('none', 5).read({ ghiWm2: 300, dhiWm2: 100 })).toEqual({ ghiWm2: 300, dhiWm2: 100 });
  });
});
