/**
 * The four photodetectors of a unit: a tilt pair (±δ in the plane of tilt) and an azimuth pair (±δ across it), fixed to
 * the panel frame, plus the in-plane reference cell that reports plane-of-array irradiance. Each reads the site's sky at its
 * own normal, with gain error, noise, optional drift and optional failure (dead detector reads ~0). The geometry is the
 * shared detector model (`detectorNormals` in shared/landscape/detector-pairs.ts); only the sensor errors live here.
 */
import { detectorNormals } from '../shared/landscape/detector-pairs';
import { FAULT_EFFECTS } from './fault-effects';
import type { Rng } from './rng';
import type { SkyField } from './sky-field';

export const DETECTOR_NAMES = ['tiltPlus', 'tiltMinus', 'azimuthPlus', 'azimuthMinus'] as const;
export type DetectorName = (typeof DETECTOR_NAMES)[number];

export interface DetectorSet {
  /** Static gain error per detector (1 = perfect), then the reference cell. */
  gain: [number, number, number, number, number];
  /** Drift multiplier per detector (1 = none); changed by the drift fault. */
  drift: [number, number, number, number];
  /** Dead detectors read only their noise floor. */
  dead: [boolean, boolean, boolean, boolean];
  /** Noise: absolute [W/m²] and relative sd. */
  noiseAbsWm2: number;
  noiseRel: number;
}

export function createDetectorSet(rng: Rng): DetectorSet {
  const g = () => 1 + 0.01 * rng.normal();
  return {
    gain: [g(), g(), g(), g(), 1 + 0.005 * rng.normal()],
    drift: [1, 1, 1, 1],
    dead: [false, false, false, false],
    noiseAbsWm2: 0.4,
    noiseRel: 0.002,
  };
}

export interface Readings {
  tiltPlusWm2: number;
  tiltMinusWm2: number;
  azimuthPlusWm2: number;
  azimuthMinusWm2: number;
  /** Reference cell in the panel plane. */
  poaWm2: number;
  /** True in-plane irradiance without sensor error (for energy and ground truth). */
  truePoaWm2: number;
}

/** Reads all five sensors; `soiling` (0…1 transmittance) dims detectors and reference cell alike. */
const DEAD = FAULT_EFFECTS.deadDetector;

export function readDetectors(
  sky: SkyField,
  set: DetectorSet,
  tiltDeg: number,
  azimuthDeg: number,
  detectorTiltDeg: number,
  rng: Rng,
): Readings {
  const n = detectorNormals(tiltDeg, azimuthDeg, detectorTiltDeg);
  const read = (i: number, e: number) => {
    const noise = rng.normal() * (set.noiseAbsWm2 + set.noiseRel * e);
    if (i < 4 && set.dead[i]) return Math.max(0, DEAD.floorWm2 + noise * DEAD.noiseShare);
    const g = set.gain[i]! * (i < 4 ? set.drift[i]! : 1);
    return Math.max(0, g * e + noise);
  };
  const truePoa = sky.irradiance(n.panel);
  return {
    tiltPlusWm2: read(0, sky.irradiance(n.tiltPlus)),
    tiltMinusWm2: read(1, sky.irradiance(n.tiltMinus)),
    azimuthPlusWm2: read(2, sky.irradiance(n.azimuthPlus)),
    azimuthMinusWm2: read(3, sky.irradiance(n.azimuthMinus)),
    poaWm2: read(4, truePoa),
    truePoaWm2: truePoa,
  };
}
