/**
 * Modelled in-plane irradiance of one unit and of its simpler twins under one modelled sky, for the statements' losses
 * and gains (computed once per site and 15-minute bucket; each value is a few microseconds once the sky is built):
 * - at the unit's reported orientation;
 * - at the best orientation the unit could reach (the one `bestReachableOrientation` of shared/landscape);
 * - a fixed-tilt twin: tilt = |latitude|, facing the equator (azimuth 180° north of the equator, 0° south of it) — the
 *   common rule of thumb for a fixed array's annual optimum (common practice);
 * - a sun-following twin: the panel normal on the sun vector (tilt = solar zenith, azimuth = solar azimuth) within the
 *   unit's travel; with the sun below the horizon (or no sun, indoors) it lies flat.
 * Irradiance comes from the landscape engine (Lambert's law over the sky model: sun, sky dome, ground, horizon,
 * facades, lamps), so on an isotropic sky without obstructions a plane receives the Liu–Jordan isotropic transposition
 * GT = Gb·Rb + Gd·(1 + cos β)/2 + G·ρ·(1 − cos β)/2 (Duffie & Beckman eq. 2.15.1). Angles in degrees, W/m².
 */
import { bestReachableOrientation, irradianceAt, type Sky, type UnitLimits } from '../landscape';

export interface TwinIrradiance {
  unitWm2: number;
  bestWm2: number;
  fixedWm2: number;
  sunWm2: number;
}

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

/** Orientation of the fixed-tilt twin at a latitude. */
export function fixedTwinOrientation(latitudeDeg: number): { tiltDeg: number; azimuthDeg: number } {
  if (!Number.isFinite(latitudeDeg) || Math.abs(latitudeDeg) > 90)
    throw new RangeError(`latitudeDeg: must be in [-90, 90]; got ${latitudeDeg}`);
  return { tiltDeg: Math.abs(latitudeDeg), azimuthDeg: latitudeDeg >= 0 ? 180 : 0 };
}

/** Orientation of the sun-following twin under a sky, within a unit's travel. */
export function sunTwinOrientation(sky: Sky, limits: UnitLimits): { tiltDeg: number; azimuthDeg: number } {
  const [t0, t1] = limits.tiltRangeDeg;
  const [a0, a1] = limits.azimuthRangeDeg;
  if (!sky.sunDirection || sky.sunElevationDeg <= 0) return { tiltDeg: clamp(0, t0, t1), azimuthDeg: a1 - a0 >= 360 ? 180 : a0 };
  let az = sky.sunAzimuthDeg;
  if (a1 - a0 < 360) {
    // Bring the sun's azimuth into the unit's encoder range if one turn does, else clamp to the nearer end.
    const k = Math.ceil((a0 - az) / 360);
    const cand = az + 360 * k;
    az = cand <= a1 ? cand : clamp(az, a0, a1);
  }
  return { tiltDeg: clamp(90 - sky.sunElevationDeg, t0, t1), azimuthDeg: az };
}

/** Best orientation memo of one sky: units with the same travel share one search. */
export class TwinModel {
  private readonly best = new Map<string, number>();

  constructor(
    readonly sky: Sky,
    readonly latitudeDeg: number,
  ) {}

  /** The modelled irradiances of one unit at its reported orientation. */
  of(unit: { tiltDeg: number; azimuthDeg: number; limits: UnitLimits }): TwinIrradiance {
    const key = `${unit.limits.tiltRangeDeg.join(',')}|${unit.limits.azimuthRangeDeg.join(',')}`;
    let bestWm2 = this.best.get(key);
    if (bestWm2 === undefined) {
      bestWm2 = bestReachableOrientation(this.sky, unit.limits).wm2;
      this.best.set(key, bestWm2);
    }
    const fixed = fixedTwinOrientation(this.latitudeDeg);
    const sun = sunTwinOrientation(this.sky, unit.limits);
    const unitWm2 = irradianceAt(this.sky, clamp(unit.tiltDeg, 0, 180), unit.azimuthDeg);
    return {
      unitWm2,
      // The reported orientation is reachable, so the best is never below it (the search is on a 1° grid).
      bestWm2: Math.max(bestWm2, unitWm2),
      fixedWm2: irradianceAt(this.sky, fixed.tiltDeg, fixed.azimuthDeg),
      sunWm2: irradianceAt(this.sky, sun.tiltDeg, sun.azimuthDeg),
    };
  }
}
