/**
 * Survey error: what a site's model is given when its survey (and its weather station) are not exact. The simulator keeps
 * the true sky; an evaluation hands the model a survey perturbed with these errors, drawn per seed.
 *
 * Distributions (every draw independent, uniform on [−bound, +bound]; `none` changes nothing):
 * | quantity | low | high | how |
 * |---|---|---|---|
 * | horizon height, each profile point | ±2° | ±5° | added, then clamped to 0…90° |
 * | facade normal azimuth, each facade | ±3° | ±8° | added, wrapped to 0…360° (its extent on the sky as surveyed) |
 * | facade reflectance, each facade | ±20 % | ±40 % | relative: ρ·(1 + u), clamped to 0…1 |
 * | ground albedo | ±0.05 | ±0.1 | added, clamped to 0…1 |
 * | station GHI and DHI gain, each | ±3 % | ±8 % | relative, one gain per site and quantity for the whole run |
 * | station reading noise, each reading | σ 1 % | σ 2.5 % | relative, normal; DHI then kept ≤ GHI |
 * One seed draws the same unit values u ∈ [−1, 1) for every level, scaled by the level's bound, so `high` errs the same
 * way as `low`, only further. Lamps and the sky type are taken as surveyed exactly.
 */
import type { SiteSurvey } from '../shared/contracts/survey';
import { createRng, type Rng } from './rng';

export const SURVEY_ERROR_LEVELS = ['none', 'low', 'high'] as const;
export type SurveyErrorLevel = (typeof SURVEY_ERROR_LEVELS)[number];

export interface SurveyErrorBounds {
  horizonDeg: number;
  facadeAzimuthDeg: number;
  /** Relative (0.2 = ±20 %). */
  reflectanceFraction: number;
  albedo: number;
  /** Relative gain error of the station's GHI and DHI. */
  stationGainFraction: number;
  /** Relative standard deviation of each station reading's noise. */
  stationNoiseFraction: number;
}

export const SURVEY_ERROR: Record<SurveyErrorLevel, SurveyErrorBounds> = {
  none: { horizonDeg: 0, facadeAzimuthDeg: 0, reflectanceFraction: 0, albedo: 0, stationGainFraction: 0, stationNoiseFraction: 0 },
  low: {
    horizonDeg: 2,
    facadeAzimuthDeg: 3,
    reflectanceFraction: 0.2,
    albedo: 0.05,
    stationGainFraction: 0.03,
    stationNoiseFraction: 0.01,
  },
  high: {
    horizonDeg: 5,
    facadeAzimuthDeg: 8,
    reflectanceFraction: 0.4,
    albedo: 0.1,
    stationGainFraction: 0.08,
    stationNoiseFraction: 0.025,
  },
};

/** What the model is told about a site: its survey and its ground albedo. */
export interface SurveyedSite {
  survey: SiteSurvey;
  albedo: number;
}

/** A station reading (as the model takes it). */
export interface StationReading {
  ghiWm2: number;
  dhiWm2: number | null;
}

/** Parses a level name; the error names the valid ones. */
export function parseSurveyErrorLevel(text: string): SurveyErrorLevel {
  if (!(SURVEY_ERROR_LEVELS as readonly string[]).includes(text))
    throw new RangeError(`survey error must be one of ${SURVEY_ERROR_LEVELS.join(', ')}; got "${text}"`);
  return text as SurveyErrorLevel;
}

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));
const wrap360 = (x: number) => ((x % 360) + 360) % 360;
const unit = (rng: Rng) => rng.uniform(-1, 1);

/**
 * The survey and albedo perturbed at a level, drawn from `seed` (the same seed and level always give the same result).
 * The input is not changed. Throws a RangeError for an unknown level.
 */
export function perturbSurvey(site: SurveyedSite, level: SurveyErrorLevel, seed: number | string): SurveyedSite {
  const b = SURVEY_ERROR[level];
  if (!b) throw new RangeError(`survey error must be one of ${SURVEY_ERROR_LEVELS.join(', ')}; got "${String(level)}"`);
  const rng = createRng(`survey-error:${seed}`);
  const horizon = site.survey.horizon.map(([a, e]) => [a, clamp(e + b.horizonDeg * unit(rng), 0, 90)] as [number, number]);
  const reflectors = site.survey.reflectors.map((f) => ({
    ...f,
    normalAzimuthDeg: wrap360(f.normalAzimuthDeg + b.facadeAzimuthDeg * unit(rng)),
    reflectance: clamp(f.reflectance * (1 + b.reflectanceFraction * unit(rng)), 0, 1),
  }));
  const albedo = clamp(site.albedo + b.albedo * unit(rng), 0, 1);
  return {
    survey: { ...site.survey, horizon, reflectors, lamps: site.survey.lamps.map((l) => ({ ...l })) },
    albedo,
  };
}

/** A site's weather station as the model reads it: a gain error per quantity for the run, and noise on each reading. */
export interface StationError {
  ghiGain: number;
  dhiGain: number;
  read(r: StationReading): StationReading;
}

/** The station error of a site at a level, drawn from `seed` (its own stream; reading noise follows in reading order). */
export function stationError(level: SurveyErrorLevel, seed: number | string): StationError {
  const b = SURVEY_ERROR[level];
  if (!b) throw new RangeError(`survey error must be one of ${SURVEY_ERROR_LEVELS.join(', ')}; got "${String(level)}"`);
  const rng = createRng(`station-error:${seed}`);
  const ghiGain = 1 + b.stationGainFraction * unit(rng);
  const dhiGain = 1 + b.stationGainFraction * unit(rng);
  const noise = rng.fork('noise');
  const sd = b.stationNoiseFraction;
  return {
    ghiGain,
    dhiGain,
    read(r) {
      if (sd === 0 && ghiGain === 1 && dhiGain === 1) return { ...r };
      const ghi = Math.max(0, r.ghiWm2 * ghiGain * (1 + sd * noise.normal()));
      const dhi = r.dhiWm2 === null ? null : Math.min(ghi, Math.max(0, r.dhiWm2 * dhiGain * (1 + sd * noise.normal())));
      return { ghiWm2: ghi, dhiWm2: dhi };
    },
  };
}
