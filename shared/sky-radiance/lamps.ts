/**
 * Point lamps for indoor sites: a distant small source in a given direction delivering `irradianceWm2` on a surface
 * facing it (normal incidence); on a plane with normal n it gives irradianceWm2 · max(0, n·l) (Lambert's cosine law).
 * Lamps are not blocked by the horizon profile (they are inside the obstruction envelope of an indoor site).
 */
import { directionFromAzimuthElevation, type Vec3 } from '../sphere/directions';

export interface LampInput {
  azimuthDeg: number;
  elevationDeg: number;
  irradianceWm2: number;
}

export interface Lamp {
  direction: Vec3;
  irradianceWm2: number;
}

export function buildLamp(l: LampInput): Lamp {
  return { direction: directionFromAzimuthElevation(l.azimuthDeg, l.elevationDeg), irradianceWm2: l.irradianceWm2 };
}
