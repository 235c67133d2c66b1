/**
 * The irradiance landscape: E(tilt, azimuth) sampled on a regular grid of panel normals.
 * Tilt from horizontal (0 = facing up), azimuth clockwise from north; row-major values [tiltIndex * nAzimuth + azimuthIndex].
 * When the azimuth range covers the full circle the grid is periodic in azimuth (no duplicate 360° column).
 */
import type { Sky } from '../sky-radiance/sky';

export interface Landscape {
  stepDeg: number;
  tiltsDeg: Float64Array;
  azimuthsDeg: Float64Array;
  /** Actual azimuth spacing (equals stepDeg unless 360/step is not an integer on a periodic grid). */
  azimuthStepDeg: number;
  periodicAzimuth: boolean;
  /** Irradiance on each panel normal, W/m². */
  values: Float64Array;
  method: 'fast' | 'brute' | 'blurred';
  /** The sky it was computed from (lets blurLandscape recompute it averaged). */
  sky?: Sky;
  /** For a blurred landscape: the detector tilt δ it represents. */
  detectorTiltDeg?: number;
}

export interface LandscapeGridOptions {
  /** Grid step, 0 < step ≤ 10 degrees; default 1. */
  stepDeg?: number;
  /** [min, max] tilt, default [0, 90]; any sub-range of [0, 180]. */
  tiltRangeDeg?: readonly [number, number];
  /** [from, to] azimuth clockwise from north, default [0, 360] (full circle, periodic). */
  azimuthRangeDeg?: readonly [number, number];
}

export function validateGridOptions(o: LandscapeGridOptions): {
  stepDeg: number;
  tilts: Float64Array;
  azimuths: Float64Array;
  azimuthStepDeg: number;
  periodic: boolean;
} {
  const stepDeg = o.stepDeg ?? 1;
  if (typeof stepDeg !== 'number' || !Number.isFinite(stepDeg) || stepDeg <= 0 || stepDeg > 10) {
    throw new RangeError(`stepDeg: must be a finite number with 0 < step ≤ 10 degrees; got ${stepDeg}`);
  }
  const [t0, t1] = o.tiltRangeDeg ?? [0, 90];
  if (![t0, t1].every((x) => Number.isFinite(x)) || t0 < 0 || t1 > 180 || t1 < t0) {
    throw new RangeError(`tiltRangeDeg: must be [min, max] with 0 ≤ min ≤ max ≤ 180; got [${t0}, ${t1}]`);
  }
  const [a0, a1] = o.azimuthRangeDeg ?? [0, 360];
  if (![a0, a1].every((x) => Number.isFinite(x)) || a0 < 0 || a0 >= 360 || a1 <= a0 || a1 - a0 > 360) {
    throw new RangeError(`azimuthRangeDeg: must be [from, to] with 0 ≤ from < 360 and from < to ≤ from + 360; got [${a0}, ${a1}]`);
  }
  const nT = Math.floor((t1 - t0) / stepDeg + 1e-9) + 1;
  const tilts = new Float64Array(nT);
  for (let i = 0; i < nT; i++) tilts[i] = t0 + i * stepDeg;
  const periodic = a1 - a0 >= 360 - 1e-9;
  let azimuths: Float64Array;
  let azimuthStepDeg = stepDeg;
  if (periodic) {
    const nA = Math.max(3, Math.round(360 / stepDeg));
    azimuthStepDeg = 360 / nA;
    azimuths = new Float64Array(nA);
    for (let j = 0; j < nA; j++) azimuths[j] = (a0 + j * azimuthStepDeg) % 360;
  } else {
    const nA = Math.floor((a1 - a0) / stepDeg + 1e-9) + 1;
    azimuths = new Float64Array(nA);
    for (let j = 0; j < nA; j++) azimuths[j] = (a0 + j * stepDeg) % 360;
  }
  return { stepDeg, tilts, azimuths, azimuthStepDeg, periodic };
}
