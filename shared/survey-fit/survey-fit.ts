/**
 * Survey corrections from a site's own units: the facade reflectances and azimuths, the horizon heights per sector and
 * the ground albedo (with a scale on the station's readings as a nuisance parameter) that make the site model (the landscape engine fed with the survey and the station's weather) agree
 * best with what the units measured — the samples of their scans and their settled in-plane readings — estimated by
 * bounded Levenberg–Marquardt least squares with the covariance of the estimate (levenberg-marquardt-1963.ts, which
 * cites Levenberg 1944, Marquardt 1963, Kanzow et al. 2004 and Seber & Wild 1989).
 *
 * The forward model is injected (`skyOf`: the survey, albedo and an epoch's instant and weather → the engine's sky), so
 * the estimator runs exactly the model the server runs and copies none of it; in-plane irradiance is the engine's
 * `irradianceAt`, the brightest orientation its `bestReachableOrientation`.
 *
 * Residual of a sample: (measured − modelled) / σ with σ = 5 W/m² + 2 % of the measured value (a reference cell's
 * calibration and the minutes a scan takes while the sun moves; common practice for field irradiance sensors, the split
 * from memory). Parameters the measurements cannot see (moving one across its whole range changes the weighted
 * residuals by less than 1 in total) are left at the survey's value and reported as not observable.
 *
 * The survey itself is evidence too: each parameter adds the residual (θ − θ_survey)/τ, τ being what a survey taken with
 * ordinary care is within (one standard deviation: horizon height 3°, facade azimuth 5°, reflectance 0.15, albedo 0.1,
 * station scale 0.05; this product's choice). This is Tikhonov regularisation toward the survey (A. N. Tikhonov (1963),
 * "Solution of incorrectly formulated problems and the regularization method", Soviet Mathematics Doklady 4,
 * 1035–1038), or the posterior mode under a Gaussian prior: a parameter the scans see only weakly stays near the survey
 * instead of absorbing small differences between the model and the world, and its uncertainty stays near τ.
 *
 * Epochs with the sun within 1.5° of an edge — where the disc or one of its facade images appears or vanishes — are
 * left out: a scan takes minutes while the sun moves about a degree every four, so one instant does not describe it
 * there, and a horizon or facade parameter would bend to fit the difference. An epoch the corrections themselves bring
 * near an edge is left out as well, and the fit made once more without it.
 *
 * Corrections are checked on scans the fit did not see: with at least four usable epochs, every fourth in time order is
 * held out; after the fit, each correction in turn (largest first, in units of τ) is taken back to the survey's value
 * when that makes the held-out epochs fit better (their weighted sum of squares falls by more than 1), and when the
 * corrections together do not fit them better than the survey by that much, none is proposed (cross-validation:
 * M. Stone (1974), "Cross-validatory choice and assessment of statistical predictions", Journal of the Royal
 * Statistical Society B 36(2), 111–147). A correction the held-out scans do not confirm is reported as such, at the
 * survey's value. The held-out model error is reported beside
 * the fitted one: an engineer reads there whether the revision predicts scans it was not fitted to.
 *
 * Model error, before and after: the mean |measured − modelled| in-plane irradiance over the samples [W/m²], and the
 * mean angle between each scan's measured brightest orientation and the model's brightest reachable one [°]. `after` is
 * the revised survey with the station read as it is (what accepting gives); `afterStationScaled` with the fitted scale
 * on the station too (what a recalibrated station would add).
 */
import type { SiteSurvey } from '../contracts/survey';
import { bestReachableOrientation, irradianceAt, type Sky, type UnitLimits } from '../landscape';
import { sunNearEdge } from '../sky-radiance/sun-visibility';
import { normalFromTiltAzimuth } from '../sphere/directions';
import { levenbergMarquardt, type LmOptions } from './levenberg-marquardt-1963';
import {
  applyCorrections,
  correctionParameters,
  stationScaleOf,
  type CorrectionKind,
  type CorrectionParameter,
} from './survey-corrections';

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
  /** Fewest epochs left once those with the sun near an edge are out (default 1); fewer is a TooFewEpochs error. */
  minEpochs?: number;
}

/** Too few epochs to fit once those with the sun near an edge are left out. */
export class TooFewEpochs extends RangeError {
  constructor(
    readonly usable: number,
    readonly needed: number,
  ) {
    super(`epochs: ${usable} usable (the sun clear of horizon and facade edges), at least ${needed} needed; scan at other times of day`);
  }
}

export interface ModelError {
  /** Mean |measured − modelled| in-plane irradiance over the samples [W/m²]. */
  meanAbsWm2: number;
  /** Mean angle between measured and modelled brightest orientation over the scans [°] (null without scans). */
  globalMaxErrorDeg: number | null;
}

export type EstimateStatus = 'fitted' | 'at-bound' | 'not-observable' | 'not-confirmed';

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
  afterStationScaled: ModelError;
  /** The fitted factor on the station's readings (1 = as reported). */
  stationScale: number;
  /** Model error on the held-out epochs (null with fewer than CHECK_EVERY usable epochs). */
  check: { epochs: number; before: ModelError; after: ModelError; afterStationScaled: ModelError } | null;
  epochs: number;
  /** Epochs left out: the sun within EDGE_MARGIN_DEG of a horizon or facade edge (module comment). */
  epochsLeftOut: number;
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

/** Sun–edge margin below which an epoch is left out [°]: about the sun's motion during a scan (module comment). */
export const EDGE_MARGIN_DEG = 1.5;

/** One epoch in this many (in time order) is held out to check the corrections on (module comment). */
export const CHECK_EVERY = 4;

/** τ per kind of parameter: how far a careful survey may be off, one standard deviation (module comment). */
export const PRIOR_WIDTH: Record<CorrectionKind, number> = {
  albedo: 0.1,
  reflectance: 0.15,
  facadeAzimuth: 5,
  horizonSector: 3,
  stationScale: 0.05,
};

/** The epoch with the station's readings scaled (the model is fed GHI and DHI × scale). */
function scaledEpoch(e: FitEpoch, scale: number): FitEpoch {
  if (scale === 1 || e.weather === null) return e;
  return { ...e, weather: { ghiWm2: e.weather.ghiWm2 * scale, dhiWm2: e.weather.dhiWm2 === null ? null : e.weather.dhiWm2 * scale } };
}

/** σ of a sample [W/m²] (module comment). */
export const sampleSigmaWm2 = (poaWm2: number) => 5 + 0.02 * Math.abs(poaWm2);

/** Model error of a survey and albedo against the epochs (also used to score a survey on epochs not fitted). */
export async function modelError(
  survey: SiteSurvey,
  albedo: number,
  epochs: readonly FitEpoch[],
  skyOf: SkyOf,
  limits: UnitLimits = DEFAULT_LIMITS,
  pause: () => Promise<void> = noPause,
  stationScale = 1,
): Promise<ModelError> {
  let abs = 0;
  let n = 0;
  let angle = 0;
  let scans = 0;
  for (const e of epochs) {
    const sky = skyOf(survey, albedo, scaledEpoch(e, stationScale));
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
  const first = await fitOnce(input, new Set());
  // The corrections may have moved an edge onto the sun or an image in some epoch (a facade turned by a few degrees):
  // those epochs are left out too and the fit is made again from the survey, once.
  const moved = new Set(input.epochs.filter((e) => sunNearEdge(input.skyOf(first.survey, first.albedo, e), EDGE_MARGIN_DEG)));
  const newlyNear = input.epochs.filter((e) => moved.has(e) && !sunNearEdge(input.skyOf(input.survey, input.albedo, e), EDGE_MARGIN_DEG));
  if (!newlyNear.length) return first;
  const usable = input.epochs.filter((e) => !moved.has(e) && !sunNearEdge(input.skyOf(input.survey, input.albedo, e), EDGE_MARGIN_DEG));
  return usable.length >= Math.max(1, input.minEpochs ?? 1) ? fitOnce(input, new Set(newlyNear)) : first;
}

async function fitOnce(input: SurveyFitInput, leaveOut: ReadonlySet<FitEpoch>): Promise<SurveyFitResult> {
  const pause = input.pause ?? noPause;
  const limits = input.limits ?? DEFAULT_LIMITS;
  const all = correctionParameters(input.survey, input.albedo);
  // A scan lasts minutes while the sun moves: near an edge (the disc or a facade image appearing or vanishing within
  // the margin) one instant does not describe it, and a horizon or facade parameter would bend to fit the difference.
  const usable = input.epochs
    .filter((e) => !leaveOut.has(e) && !sunNearEdge(input.skyOf(input.survey, input.albedo, e), EDGE_MARGIN_DEG))
    .sort((a, b) => a.atMs - b.atMs);
  if (usable.length < Math.max(1, input.minEpochs ?? 1)) throw new TooFewEpochs(usable.length, Math.max(1, input.minEpochs ?? 1));
  // Every CHECK_EVERY-th epoch (in time order) is held out to check the corrections on (module comment).
  const held = usable.length >= CHECK_EVERY;
  const epochs = usable.filter((_, i) => !held || i % CHECK_EVERY !== CHECK_EVERY - 1);
  const checkEpochs = held ? usable.filter((_, i) => i % CHECK_EVERY === CHECK_EVERY - 1) : [];
  const samples = epochs.flatMap((e) => e.samples);
  const sigma = Float64Array.from(samples, (s) => sampleSigmaWm2(s.poaWm2));

  const modelled = async (values: readonly number[]): Promise<Float64Array> => {
    const { survey, albedo } = applyCorrections(input.survey, all, values);
    const scale = stationScaleOf(all, values);
    const out = new Float64Array(samples.length);
    let i = 0;
    for (const e of epochs) {
      const sky = input.skyOf(survey, albedo, scaledEpoch(e, scale));
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
        // The samples' residuals, then one per parameter pulling it toward the survey (module comment).
        residuals: async (x) => {
          const r = weighted(await modelled(full(x)));
          const out = new Float64Array(r.length + free.length);
          out.set(r);
          free.forEach(
            (p, c) => (out[r.length + c] = (x[c]! - p.value) / (PRIOR_WIDTH[p.kind] * Number(globalThis.process?.env['TMP_TAU'] ?? 1))),
          );
          return out;
        },
      },
      input.lm,
    );
    values = full(lm.theta);
  }
  // Cross-validation against the held-out epochs: a correction that does not make them fit better is taken back.
  const reverted = new Set<number>();
  if (checkEpochs.length && lm) {
    const checkCost = async (v: readonly number[]) => {
      const { survey, albedo } = applyCorrections(input.survey, all, v);
      const scale = stationScaleOf(all, v);
      let cost = 0;
      for (const e of checkEpochs) {
        const sky = input.skyOf(survey, albedo, scaledEpoch(e, scale));
        for (const x of e.samples) cost += ((x.poaWm2 - irradianceAt(sky, x.tiltDeg, x.azimuthDeg)) / sampleSigmaWm2(x.poaWm2)) ** 2;
        await pause();
      }
      return cost;
    };
    let current = values.slice();
    let cost = await checkCost(current);
    const order = all
      .map((p, k) => ({ k, moved: Math.abs(current[k]! - p.value) / PRIOR_WIDTH[p.kind] }))
      .filter((x) => x.moved > 0)
      .sort((a, b) => b.moved - a.moved);
    for (const { k } of order) {
      const trial = current.slice();
      trial[k] = all[k]!.value;
      const c = await checkCost(trial);
      // Taken back only on evidence: the held-out weighted squares fall by more than 1 (one σ² of one sample). A correction
      // the held-out scans cannot see either way keeps its fitted value.
      if (c < cost - 1) {
        current = trial;
        cost = c;
        reverted.add(k);
      }
    }
    // The revision as a whole must predict the held-out epochs better than the survey does, else nothing is proposed.
    if (cost > (await checkCost(start)) - 1) {
      all.forEach((p, k) => {
        if (current[k] !== p.value) reverted.add(k);
      });
      current = start.slice();
    }
    values = current;
  }
  const revised = applyCorrections(input.survey, all, values);
  const freeIndex = new Map(free.map((p, c) => [p.key, c]));
  const parameters = all.map((p, k): ParameterEstimate => {
    const c = freeIndex.get(p.key);
    const status: EstimateStatus =
      c === undefined ? 'not-observable' : reverted.has(k) ? 'not-confirmed' : lm!.atBound[c] ? 'at-bound' : 'fitted';
    return {
      key: p.key,
      kind: p.kind,
      label: p.label,
      unit: p.unit,
      before: p.value,
      after: values[k]!,
      uncertainty: c === undefined || reverted.has(k) ? null : lm!.standardErrors[c]!,
      bounds: [p.lower, p.upper],
      status,
    };
  });
  const before = await modelError(input.survey, input.albedo, epochs, input.skyOf, limits, pause);
  const after = await modelError(revised.survey, revised.albedo, epochs, input.skyOf, limits, pause);
  const stationScale = stationScaleOf(all, values);
  const afterStationScaled =
    stationScale === 1 ? after : await modelError(revised.survey, revised.albedo, epochs, input.skyOf, limits, pause, stationScale);
  const check = checkEpochs.length
    ? {
        epochs: checkEpochs.length,
        before: await modelError(input.survey, input.albedo, checkEpochs, input.skyOf, limits, pause),
        after: await modelError(revised.survey, revised.albedo, checkEpochs, input.skyOf, limits, pause),
        afterStationScaled: await modelError(revised.survey, revised.albedo, checkEpochs, input.skyOf, limits, pause, stationScale),
      }
    : null;
  return {
    survey: revised.survey,
    albedo: revised.albedo,
    parameters,
    before,
    after,
    afterStationScaled,
    stationScale,
    check,
    epochs: epochs.length,
    epochsLeftOut: input.epochs.length - usable.length,
    samples: samples.length,
    iterations: lm?.iterations ?? 0,
    evaluations: (lm?.evaluations ?? 0) + 1 + all.length,
    converged: lm?.converged ?? true,
    residualVariance: lm?.residualVariance ?? null,
  };
}

export type { CorrectionParameter };
