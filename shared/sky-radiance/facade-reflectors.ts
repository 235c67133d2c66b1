/**
 * Specular facade reflectors (glazed building faces) as seen from the site.
 *
 * Geometry of a plane mirror (law of reflection): looking in direction v at a plane with unit normal m, the site sees
 * the radiance arriving from r = v − 2(v·m)m, times the facade's specular reflectance ρ. The sun's image therefore
 * appears at v = s − 2(s·m)m, visible when the facade faces the sun (s·m > 0) and the image lies inside the facade's
 * angular extent. The facade's own view of the sun and sky is taken as unobstructed. Reflectance is constant
 * (for glass it depends on incidence: ≈ 0.08 uncoated at normal incidence, 0.1…0.4 for solar-control coatings).
 *
 * Angular extent: an azimuth band (clockwise from `azimuthFromDeg` to `azimuthToDeg`, may wrap through north)
 * times an elevation band [elevationFromDeg, elevationToDeg] as surveyed from the site.
 */
import { directionFromAzimuthElevation, dot, reflectDirection, type Vec3, wrap360 } from '../sphere/directions';

export interface ReflectorInput {
  /** Facade normal azimuth (clockwise from north): the direction the glass faces. */
  normalAzimuthDeg: number;
  /** Facade normal elevation: 0 for a vertical facade. Default 0. */
  normalElevationDeg?: number;
  azimuthFromDeg: number;
  azimuthToDeg: number;
  elevationFromDeg: number;
  elevationToDeg: number;
  /** Specular reflectance 0…1. */
  reflectance: number;
}

export interface Reflector {
  normal: Vec3;
  azimuthFromDeg: number;
  /** Width of the azimuth band, 0…360. */
  azimuthWidthDeg: number;
  elevationFromDeg: number;
  elevationToDeg: number;
  reflectance: number;
}

export function buildReflector(r: ReflectorInput): Reflector {
  const width = wrap360(r.azimuthToDeg - r.azimuthFromDeg);
  return {
    normal: directionFromAzimuthElevation(r.normalAzimuthDeg, r.normalElevationDeg ?? 0),
    azimuthFromDeg: wrap360(r.azimuthFromDeg),
    azimuthWidthDeg: width === 0 ? 360 : width,
    elevationFromDeg: Math.min(r.elevationFromDeg, r.elevationToDeg),
    elevationToDeg: Math.max(r.elevationFromDeg, r.elevationToDeg),
    reflectance: r.reflectance,
  };
}

/** Whether a direction (given by azimuth/elevation) lies inside the reflector's angular extent. */
export function reflectorContains(r: Reflector, azimuthDeg: number, elevationDeg: number): boolean {
  if (elevationDeg < r.elevationFromDeg || elevationDeg > r.elevationToDeg) return false;
  const da = wrap360(azimuthDeg - r.azimuthFromDeg);
  return da <= r.azimuthWidthDeg;
}

/** Length (deg) of the overlap of the azimuth band [a0, a0 + w] with the reflector's azimuth band. */
export function reflectorAzimuthOverlapDeg(r: Reflector, a0: number, w: number): number {
  let total = 0;
  for (const shift of [-360, 0, 360]) {
    const lo = Math.max(a0, r.azimuthFromDeg + shift);
    const hi = Math.min(a0 + w, r.azimuthFromDeg + shift + r.azimuthWidthDeg);
    if (hi > lo) total += hi - lo;
  }
  return Math.min(total, w);
}

/** The mirrored direction seen through the reflector when looking along v, or null when v sees the facade's back. */
export function reflectedViewDirection(r: Reflector, v: Vec3): Vec3 | null {
  if (dot(v, r.normal) >= 0) return null;
  return reflectDirection(v, r.normal);
}

/** Direction of the sun's image in the reflector, or null when the facade does not face the sun or the image is outside it. */
export function sunImageDirection(
  r: Reflector,
  sun: Vec3,
  sunAzimuthElevation: (v: Vec3) => { azimuthDeg: number; elevationDeg: number },
): Vec3 | null {
  if (dot(sun, r.normal) <= 0) return null;
  const v = reflectDirection(sun, r.normal);
  const { azimuthDeg, elevationDeg } = sunAzimuthElevation(v);
  return reflectorContains(r, azimuthDeg, elevationDeg) ? v : null;
}
