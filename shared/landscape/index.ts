/**
 * Brightward irradiance landscape engine — public surface.
 *
 * Conventions (stated once for the whole engine):
 * - A panel normal is given by tilt from horizontal (0 = facing straight up, 90 = vertical) and azimuth clockwise
 *   from true north (90 = east). Sun, lamp, facade and horizon azimuths are clockwise from north too.
 * - Longitude is east-positive. Times are instants with an explicit UTC offset (ISO 8601), never local wall time alone.
 * - Irradiance in W/m², radiance in W/(m²·sr), angles in degrees unless a name says Rad.
 *
 * Typical use:
 *   const sky = buildSky({ sun: { azimuthDeg: 160, elevationDeg: 35, dniWm2: 800 }, dhiWm2: 110, skyType: 12 });
 *   const land = computeLandscape(sky, { stepDeg: 1 });            // fast path, tilt 0–90 × azimuth 0–359
 *   const e = irradianceAt(sky, 30, 180);                          // one normal, microseconds
 *   const report = analyseLandscape(sky, { stepDeg: 1, detectorTiltDeg: 10 });
 */
import { normalFromTiltAzimuth, type Vec3 } from '../sphere/directions';
import type { Sky } from '../sky-radiance/sky';
import {
  ascentTrajectoryWith,
  detectorReadingsWith,
  type DetectorReadings,
  type TrajectoryPoint,
  type UnitControl,
} from './detector-pairs';
import { blurLandscape } from './blurred-landscape';
import { irradianceBruteAtNormal, landscapeBruteValues } from './irradiance-brute';
import { irradianceFastAtNormal, landscapeFastValues, SH_ORDER } from './irradiance-fast';
import { analysePeaks, basinShares, defaultMinProminenceWm2, gridGraph, type Peak } from './landscape-analysis';
import { bestReachableOrientationWith, type BestOrientation, type BestOrientationOptions, type UnitLimits } from './best-orientation';
import { validateGridOptions, type Landscape, type LandscapeGridOptions } from './landscape-grid';

export { buildSky, extendedRadiance, type Sky, type SkyInput, type SkyType } from '../sky-radiance/sky';
export { type DetectorReadings, type TrajectoryPoint, type UnitControl } from './detector-pairs';
export { blurLandscape, capRadiusForDetectorTiltDeg } from './blurred-landscape';
export { type Landscape, type LandscapeGridOptions } from './landscape-grid';
export { analysePeaks, basinShares, type Peak } from './landscape-analysis';
export {
  BEST_ORIENTATION_RESOLUTION_DEG,
  bestReachableOrientationWith,
  STANDARD_UNIT_LIMITS,
  TRAP_RATIO,
  type BestOrientation,
  type BestOrientationOptions,
  type UnitLimits,
} from './best-orientation';
export { SH_ORDER };

export type Method = 'fast' | 'brute';

export interface LandscapeOptions extends LandscapeGridOptions {
  /** 'fast' (closed form + spherical harmonics, default) or 'brute' (direct quadrature reference). */
  method?: Method;
}

/** Irradiance landscape E(tilt, azimuth) on a grid. */
export function computeLandscape(sky: Sky, options: LandscapeOptions = {}): Landscape {
  const g = validateGridOptions(options);
  const method = options.method ?? 'fast';
  const values = method === 'brute' ? landscapeBruteValues(sky, g.tilts, g.azimuths) : landscapeFastValues(sky, g.tilts, g.azimuths);
  return {
    stepDeg: g.stepDeg,
    tiltsDeg: g.tilts,
    azimuthsDeg: g.azimuths,
    azimuthStepDeg: g.azimuthStepDeg,
    periodicAzimuth: g.periodic,
    values,
    method,
    sky,
  };
}

/** Irradiance on a plane given by its unit normal [east, north, up]. */
export function irradianceOnNormal(sky: Sky, n: Vec3, method: Method = 'fast'): number {
  return method === 'brute' ? irradianceBruteAtNormal(sky, n) : irradianceFastAtNormal(sky, n);
}

/** Irradiance on one panel orientation (W/m²); the fast path costs a few microseconds after the first call per sky. */
export function irradianceAt(sky: Sky, tiltDeg: number, azimuthDeg: number, method: Method = 'fast'): number {
  if (!Number.isFinite(tiltDeg) || !Number.isFinite(azimuthDeg))
    throw new RangeError(`tiltDeg/azimuthDeg: must be finite numbers; got ${tiltDeg}, ${azimuthDeg}`);
  return irradianceOnNormal(sky, normalFromTiltAzimuth(tiltDeg, azimuthDeg), method);
}

/** The best orientation a unit with these limits can reach under a sky, at a stated resolution (fast irradiance). */
export function bestReachableOrientation(sky: Sky, limits: UnitLimits, options: BestOrientationOptions = {}): BestOrientation {
  // A dark sky (night, no lamps) lights no orientation: the same search over zeros, without building the fast model.
  const dark = !sky.ghiWm2 && !sky.dhiWm2 && !sky.dniWm2 && !sky.pointSources.length;
  return bestReachableOrientationWith(dark ? () => 0 : (n) => irradianceFastAtNormal(sky, n), limits, options);
}

/** Readings of the tilt and azimuth detector pairs (±δ) and the two photodifferentials at a panel orientation. */
export function detectorReadings(
  sky: Sky,
  tiltDeg: number,
  azimuthDeg: number,
  detectorTiltDeg: number,
  method: Method = 'fast',
): DetectorReadings {
  if (!Number.isFinite(detectorTiltDeg) || detectorTiltDeg < 0 || detectorTiltDeg > 45) {
    throw new RangeError(`detectorTiltDeg: must be a finite number in [0, 45]; got ${detectorTiltDeg}`);
  }
  return detectorReadingsWith((n) => irradianceOnNormal(sky, n, method), tiltDeg, azimuthDeg, detectorTiltDeg);
}

/** The path a unit with the given detector tilt, gain and deadband takes from a start orientation. */
export function ascentTrajectory(
  sky: Sky,
  start: { tiltDeg: number; azimuthDeg: number },
  control: UnitControl,
): { points: TrajectoryPoint[]; converged: boolean } {
  return ascentTrajectoryWith((n) => irradianceFastAtNormal(sky, n), start, control);
}

/** Global maximum and prominent local maxima of a landscape. */
export function findMaxima(l: Landscape, options: { minProminenceWm2?: number } = {}): { globalMax: Peak; localMaxima: Peak[] } {
  const a = analysePeaks(l, options.minProminenceWm2);
  return { globalMax: a.peaks[0]!, localMaxima: a.peaks };
}

export interface LandscapeAnalysisOptions {
  stepDeg?: number;
  /** Reachable tilt range, default [0, 90]. */
  tiltRangeDeg?: readonly [number, number];
  /** Reachable azimuth range, default the full circle. */
  azimuthRangeDeg?: readonly [number, number];
  /** Detector tilt δ for basin shares; default 0 (an ideal, infinitesimal pair). */
  detectorTiltDeg?: number;
  /** Largest δ tried by the single-peak search (0.5° steps); default 30°. */
  maxDetectorTiltDeg?: number;
  /** Prominence below which a maximum counts as a ripple; default max(1 W/m², 0.5 % of the global maximum). */
  minProminenceWm2?: number;
  method?: Method;
}

export interface LandscapeReport {
  globalMax: { tiltDeg: number; azimuthDeg: number; wm2: number };
  localMaxima: { tiltDeg: number; azimuthDeg: number; wm2: number; prominenceWm2: number; basinShare: number }[];
  minSinglePeakDetectorTiltDeg: number | null;
  detectorTiltDeg: number;
  minProminenceWm2: number;
  stepDeg: number;
}

/**
 * Full analysis over the reachable range: global maximum; every prominent local maximum with its basin share under
 * gradient ascent with detector tilt δ; the smallest δ (0.5° steps up to maxDetectorTiltDeg) whose blurred landscape
 * has a single peak (null if none). Blurred landscapes come from the fast path (even when `method` is 'brute') and
 * average over directions beyond the reachable range too (detectors see past the actuator limits). The search scans
 * δ every 2° and refines the last 2° bracket in 0.5° steps, so it relies on the peak count not rising again within
 * 2° (it never rises on the test skies; see test/shared). When the raw landscape already has one peak the answer is
 * the smallest detector tilt considered, 0.5°.
 */
export function analyseLandscape(sky: Sky, options: LandscapeAnalysisOptions = {}): LandscapeReport {
  const stepDeg = options.stepDeg ?? 1;
  const tiltRange = options.tiltRangeDeg ?? [0, 90];
  const azRange = options.azimuthRangeDeg ?? [0, 360];
  const delta = options.detectorTiltDeg ?? 0;
  const maxDelta = options.maxDetectorTiltDeg ?? 30;
  if (!Number.isFinite(delta) || delta < 0 || delta > 45)
    throw new RangeError(`detectorTiltDeg: must be a finite number in [0, 45]; got ${delta}`);
  if (!Number.isFinite(maxDelta) || maxDelta < 0.5 || maxDelta > 45)
    throw new RangeError(`maxDetectorTiltDeg: must be a finite number in [0.5, 45]; got ${maxDelta}`);
  const raw = computeLandscape(sky, { stepDeg, tiltRangeDeg: tiltRange, azimuthRangeDeg: azRange, method: options.method });
  const graph = gridGraph(raw);
  const rawPeaks = analysePeaks(raw, options.minProminenceWm2, graph);
  const threshold = rawPeaks.minProminenceWm2;
  const shares = basinShares(rawPeaks, blurLandscape(raw, delta));
  // Smallest δ on the 0.5° grid with a single peak: scan every 2°, then refine inside the last bracket.
  const peakCount = (d: number) => analysePeaks(blurLandscape(raw, d), threshold, graph).peaks.length;
  let minSingle: number | null = null;
  if (rawPeaks.peaks.length === 1) minSingle = 0.5;
  else {
    let previous = 0;
    for (let d = 2; d <= maxDelta + 2 - 1e-9; d += 2) {
      const dd = Math.min(d, maxDelta);
      if (peakCount(dd) === 1) {
        minSingle = dd;
        for (let r = previous + 0.5; r < dd - 1e-9; r += 0.5) {
          if (peakCount(r) === 1) {
            minSingle = r;
            break;
          }
        }
        break;
      }
      previous = dd;
      if (dd >= maxDelta) break;
    }
  }
  const g = rawPeaks.peaks[0]!;
  return {
    globalMax: { tiltDeg: g.tiltDeg, azimuthDeg: g.azimuthDeg, wm2: g.wm2 },
    localMaxima: rawPeaks.peaks.map((p) => ({
      tiltDeg: p.tiltDeg,
      azimuthDeg: p.azimuthDeg,
      wm2: p.wm2,
      prominenceWm2: p.prominenceWm2,
      basinShare: shares.get(p.node) ?? 0,
    })),
    minSinglePeakDetectorTiltDeg: minSingle,
    detectorTiltDeg: delta,
    minProminenceWm2: threshold,
    stepDeg,
  };
}

export { defaultMinProminenceWm2 };
