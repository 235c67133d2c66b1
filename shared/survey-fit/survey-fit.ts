/**
 * Survey corrections from a site's own units: the facade reflectances and azimuths, the horizon heights per sector and
 * the ground albedo that make the site model (the landscape engine fed with the survey and the station's weather) agree
 * best with what the units measured — the samples of their scans and their settled in-plane readings — estimated by
 * bounded Levenberg–Marquardt least squares with the covariance of the estimate (levenberg-marquardt-1963.ts, which
 * cites Levenberg 1944, Marquardt 1963, Kanzow et al. 2004 and Seber & Wild 1989).
 *
 * The forward model is injected (`skyOf`: the survey, albedo and an epoch's instant and weather → the engine's sky), so
 * the estimator runs exactly the model the server runs and copies none of it; in-plane irradiance is the engine's
 * `irradianceAt`, the brightest orientation its `bestReachableOrientation`.
 *
 * Residual of a sample: (measured − modelled) / σ with σ = 10 W/m² + 5 % of the measured value (a reference cell's
 * calibration and the few minutes a scan takes while the sun moves; common practice for field irradiance sensors, the
 * split from memory). Parameters the measurements cannot see (moving one across its whole range changes the weighted
 * residuals by less than 1 in total) are left at the survey's value and reported as not observable.
 *
 * Model error, before and after: the mean |measured − modelled| in-plane irradiance over the samples [W/m²], and the
 * mean angle between each scan's measured brightest orientation and the model's brightest reachable one [°].
 */
import type { SiteSurvey } from '../contracts/survey';
import { bestReachableOrientation, irradianceAt, type Sky, type UnitLimits } from '../landscape';
import { normalFromTiltAzimuth } from '../sphere/directions';
import { levenbergMarquardt, type LmOptions } from './levenberg-marquardt-1963';
import { applyCorrections, correctionParameters, type CorrectionKind, type CorrectionParameter } from './survey-corrections';

/** One measurement of in-plane irradiance at an orientation [°, W/m²]. */
export interface FitSample {
  tiltDeg: number;
  azimuthDeg: number;
  poaWm2: number;
}

/** Measurements at one instant, with the site's weather then (what the model is fed). */
export interface FitEpoch {
  atMs: number;
  weather: { ghiWm2: number; dhiWm2: number | null } | null;
  samples: FitSample[];
  /** The brightest orientation a scan at this instant measured, when the epoch holds a scan. */
  measuredMax?: { tiltDeg: number; azimuthDeg: number } | null;
}

export type SkyOf = (survey: SiteSurvey, albedo: number, epoch: FitEpoch) => Sky;

export interface SurveyFitInput {
  survey: SiteSurvey;
  albedo: number;
  epochs: readonly FitEpoch[];
  skyOf: SkyOf;
  /** Travel of the site's units, for the brightest reachable orientation; default tilt 0…85°, any azimuth. */
  limits?: UnitLimits;
  /** Called between model evaluations (a caller on an event loop gives other work a turn). */
  pause?: () => Promise<void>;
  lm?: LmOptions;
}

export interface ModelError {
  /** Mean |measured − modelled| in-plane irradiance over the samples [W/m²]. */
  meanAbsWm2: number;
  /** Mean angle between measured and modelled brightest orientation over the scans [°] (null without scans). */
  globalMaxErrorDeg: number | null;
}

export type EstimateStatus = 'fitted' | 'at-bound' | 'not-observable';

export interface ParameterEstimate {
  key: string;
  kind: CorrectionKind;
  label: string;
  unit: '' | '°';
  before: number;
  after: number;
  /** One standard error of `after` (null at a bound or when not observable). */
  uncertainty: number | null;
  bounds: [number, number];
  status: EstimateStatus;
}

export interface SurveyFitResult {
  survey: SiteSurvey;
  albedo: number;
  parameters: ParameterEstimate[];
  before: ModelError;
  after: ModelError;
  epochs: number;
  samples: number;
  iterations: number;
  evaluations: number;
  converged: boolean;
  /** s²: weighted residual variance at the solution (≈ 1 when σ describes the misfit). */
  residualVariance: number | null;
}

const noPause = () => Promise.resolve();
const DEFAULT_LIMITS: UnitLimits = { tiltRangeDeg: [0, 85], azimuthRangeDeg: [0, 360] };

/** Angle between two panel normals [°]. */
export function angleBetweenNormalsDeg(a: { tiltDeg: number; azimuthDeg: number }, b: { tiltDeg: number; azimuthDeg: number }): number {
  const u = normalFromTiltAzimuth(a.tiltDeg, a.azimuthDeg);
  const v = normalFromTiltAzimuth(b.tiltDeg, b.azimuthDeg);
  const c = u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
  return (Math.acos(Math.min(1, Math.max(-1, c))) * 180) / Math.PI;
}

/** σ of a sample [W/m²] (module comment). */
export const sampleSigmaWm2 = (poaWm2: number) => 10 + 0.05 * Math.abs(poaWm2);

/** Model error of a survey and albedo against the epochs (also used to score a survey on epochs not fitted). */
export async function modelError(
  survey: SiteSurvey,
  albedo: number,
  epochs: readonly FitEpoch[],
  skyOf: SkyOf,
  limits: UnitLimits = DEFAULT_LIMITS,
  pause: () => Promise<void> = noPause,
): Promise<ModelError> {
  let abs = 0;
  let n = 0;
  let angle = 0;
  let scans = 0;
  for (const e of epochs) {
    const sky = skyOf(survey, albedo, e);
    for (const s of e.samples) {
      abs += Math.abs(s.poaWm2 - irradianceAt(sky, s.tiltDeg, s.azimuthDeg));
      n++;
    }
    if (e.measuredMax) {
      angle += angleBetweenNormalsDeg(e.measuredMax, bestReachableOrientation(sky, limits));
      scans++;
    }
    await pause();
  }
  return { meanAbsWm2: n ? abs / n : 0, globalMaxErrorDeg: scans ? angle / scans : null };
}

function checkInput(i: SurveyFitInput): void {
  if (!i.epochs.length) throw new RangeError('epochs: needs at least one epoch of measurements');
  i.epochs.forEach((e, k) => {
    if (!Number.isFinite(e.atMs)) throw new RangeError(`epochs[${k}].atMs: must be a finite instant`);
    e.samples.forEach((s, j) => {
      if (![s.tiltDeg, s.azimuthDeg, s.poaWm2].every(Number.isFinite))
        throw new RangeError(`epochs[${k}].samples[${j}]: tilt, azimuth and irradiance must be finite numbers`);
      if (s.poaWm2 < 0) throw new RangeError(`epochs[${k}].samples[${j}].poaWm2: must be ≥ 0; got ${s.poaWm2}`);
    });
  });
  if (!Number.isFinite(i.albedo) || i.albedo < 0 || i.albedo > 1) throw new RangeError(`albedo: must be in [0, 1]; got ${i.albedo}`);
}

/** Estimates the survey corrections (module comment). Throws RangeError naming a bad input. */
export async function fitSurveyCorrections(input: SurveyFitInput): Promise<SurveyFitResult> {
  checkInput(input);
  const pause = input.pause ?? noPause;
  const limits = input.limits ?? DEFAULT_LIMITS;
  const all = correctionParameters(input.survey, input.albedo);
  const samples = input.epochs.flatMap((e) => e.samples);
  const sigma = Float64Array.from(samples, (s) => sampleSigmaWm2(s.poaWm2));

  const modelled = async (values: readonly number[]): Promise<Float64Array> => {
    const { survey, albedo } = applyCorrections(input.survey, all, values);
    const out = new Float64Array(samples.length);
    let i = 0;
    for (const e of input.epochs) {
      const sky = input.skyOf(survey, albedo, e);
      for (const s of e.samples) out[i++] = irradianceAt(sky, s.tiltDeg, s.azimuthDeg);
      await pause();
    }
    return out;
  };
  const weighted = (m: Float64Array) => Float64Array.from(m, (x, i) => (samples[i]!.poaWm2 - x) / sigma[i]!);

  // Observability: move each parameter to the bound farther away and see whether the weighted residuals notice.
  const start = all.map((p) => p.value);
  const base = weighted(await modelled(start));
  const observable: boolean[] = [];
  for (const [k, p] of all.entries()) {
    if (p.upper <= p.lower) {
      observable.push(false);
      continue;
    }
    const v = start.slice();
    v[k] = p.upper - p.value >= p.value - p.lower ? p.upper : p.lower;
    const r = weighted(await modelled(v));
    let change = 0;
    for (let i = 0; i < r.length; i++) change += (r[i]! - base[i]!) ** 2;
    observable.push(Math.sqrt(change) >= 1);
  }
  const free = all.filter((_, k) => observable[k]);
  const full = (x: readonly number[]) => {
    const v = start.slice();
    let c = 0;
    all.forEach((_, k) => {
      if (observable[k]) v[k] = x[c++]!;
    });
    return v;
  };

  let values = start;
  let lm: Awaited<ReturnType<typeof levenbergMarquardt>> | null = null;
  if (free.length) {
    lm = await levenbergMarquardt(
      {
        start: free.map((p) => p.value),
        lower: free.map((p) => p.lower),
        upper: free.map((p) => p.upper),
        stepSizes: free.map((p) => p.stepSize),
        residuals: async (x) => weighted(await modelled(full(x))),
      },
      input.lm,
    );
    values = full(lm.theta);
  }
  const revised = applyCorrections(input.survey, all, values);
  const freeIndex = new Map(free.map((p, c) => [p.key, c]));
  const parameters = all.map((p, k): ParameterEstimate => {
    const c = freeIndex.get(p.key);
    const status: EstimateStatus = c === undefined ? 'not-observable' : lm!.atBound[c] ? 'at-bound' : 'fitted';
    return {
      key: p.key,
      kind: p.kind,
      label: p.label,
      unit: p.unit,
      before: p.value,
      after: values[k]!,
      uncertainty: c === undefined ? null : lm!.standardErrors[c]!,
      bounds: [p.lower, p.upper],
      status,
    };
  });
  const before = await modelError(input.survey, input.albedo, input.epochs, input.skyOf, limits, pause);
  const after = await modelError(revised.survey, revised.albedo, input.epochs, input.skyOf, limits, pause);
  return {
    survey: revised.survey,
    albedo: revised.albedo,
    parameters,
    before,
    after,
    epochs: input.epochs.length,
    samples: samples.length,
    iterations: lm?.iterations ?? 0,
    evaluations: (lm?.evaluations ?? 0) + 1 + all.length,
    converged: lm?.converged ?? true,
    residualVariance: lm?.residualVariance ?? null,
  };
}

export type { CorrectionParameter };
