/**
 * A site survey as a real survey would have it wrong, for the offline evaluation: every quantity off by an independent
 * uniform error, drawn from a seeded source, at one of three levels (issue 15 §1's `low` and `high`):
 *
 * | level | horizon point heights | facade normal azimuth | facade reflectance | albedo  | station GHI and DHI             |
 * |-------|-----------------------|-----------------------|--------------------|---------|---------------------------------|
 * | none  | 0                     | 0                     | 0                  | 0       | 0                               |
 * | low   | ±2° each point        | ±3° each facade       | ±20 % (relative)   | ±0.05   | gain ±3 %, then 1 % noise/reading |
 * | high  | ±5° each point        | ±8° each facade       | ±40 % (relative)   | ±0.1    | gain ±8 %, then 1 % noise/reading |
 *
 * Uniform on [−a, +a]; heights kept in 0…90°, reflectance and albedo in 0…1, azimuths wrapped to 0…360°. The station's
 * gain is one draw per seed (both quantities), its noise Gaussian per reading. Invented errors, evaluation only.
 */
import type { SiteSurvey } from '../../shared/contracts/survey';
import { createRng } from '../../simulator/rng';

export type SurveyErrorLevel = 'none' | 'low' | 'high';

export const SURVEY_ERROR: Record<
  SurveyErrorLevel,
  { horizonDeg: number; facadeAzimuthDeg: number; reflectanceRel: number; albedo: number; stationGain: number; stationNoise: number }
> = {
  none: { horizonDeg: 0, facadeAzimuthDeg: 0, reflectanceRel: 0, albedo: 0, stationGain: 0, stationNoise: 0 },
  low: { horizonDeg: 2, facadeAzimuthDeg: 3, reflectanceRel: 0.2, albedo: 0.05, stationGain: 0.03, stationNoise: 0.01 },
  high: { horizonDeg: 5, facadeAzimuthDeg: 8, reflectanceRel: 0.4, albedo: 0.1, stationGain: 0.08, stationNoise: 0.01 },
};

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

export interface PerturbedSurvey {
  survey: SiteSurvey;
  albedo: number;
  /** The station as the model reads it: (true GHI, true DHI) → (reported GHI, reported DHI). */
  station(ghiWm2: number, dhiWm2: number): { ghiWm2: number; dhiWm2: number };
  stationGain: number;
}

export function perturbSurvey(survey: SiteSurvey, albedo: number, level: SurveyErrorLevel, seed: number): PerturbedSurvey {
  const e = SURVEY_ERROR[level];
  const rng = createRng(`survey-error:${level}:${seed}`);
  const u = (a: number) => (a === 0 ? 0 : rng.uniform(-a, a));
  const horizon = survey.horizon.map(([az, el]) => [az, clamp(el + u(e.horizonDeg), 0, 90)] as [number, number]);
  const reflectors = survey.reflectors.map((r) => ({
    ...r,
    normalAzimuthDeg: (((r.normalAzimuthDeg + u(e.facadeAzimuthDeg)) % 360) + 360) % 360,
    reflectance: clamp(r.reflectance * (1 + u(e.reflectanceRel)), 0, 1),
  }));
  const perturbedAlbedo = clamp(albedo + u(e.albedo), 0, 1);
  const gain = 1 + u(e.stationGain);
  const noise = rng.fork('station-noise');
  return {
    survey: { ...survey, horizon, reflectors },
    albedo: perturbedAlbedo,
    stationGain: gain,
    station: (ghiWm2, dhiWm2) => {
      const n = () => (e.stationNoise ? 1 + e.stationNoise * noise.normal() : 1);
      const ghi = Math.max(0, ghiWm2 * gain * n());
      return { ghiWm2: ghi, dhiWm2: Math.min(ghi, Math.max(0, dhiWm2 * gain * n())) };
    },
  };
}
