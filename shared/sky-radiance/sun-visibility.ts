/**
 * Whether a site sees the sun's disc centre in a built sky, and whether the sun is near an edge where that (or one of
 * its facade images) changes — the same tests the sky uses to hide the disc and place the images
 * (horizon-profile.ts, facade-reflectors.ts), without regard to how bright the beam is. Angles in degrees.
 */
import { directionFromAzimuthElevation, type Vec3 } from '../sphere/directions';
import { reflectorContains, sunImageDirection } from './facade-reflectors';
import { horizonElevationDeg } from './horizon-profile';
import type { Sky } from './sky';

const DEG = 180 / Math.PI;
const azimuthElevationOf = (v: Vec3) => ({
  azimuthDeg: (((Math.atan2(v[0], v[1]) * DEG) % 360) + 360) % 360,
  elevationDeg: Math.asin(Math.max(-1, Math.min(1, v[2]))) * DEG,
});

/** Whether the sun at (azimuth, elevation) is seen: above the horizontal, the horizon profile and no facade in front. */
function seenAt(sky: Sky, azimuthDeg: number, elevationDeg: number): boolean {
  if (elevationDeg <= 0 || elevationDeg <= horizonElevationDeg(sky.horizon, azimuthDeg)) return false;
  return !sky.reflectors.some((r) => reflectorContains(r, azimuthDeg, elevationDeg));
}

export function sunSeenFromSite(sky: Sky): boolean {
  return sky.sunDirection !== null && seenAt(sky, sky.sunAzimuthDeg, sky.sunElevationDeg);
}

/**
 * Whether moving the sun by `marginDeg` in azimuth or elevation changes what the site sees of it: the disc hidden or
 * not, or a facade's image of it inside the facade or not. A model of a scan that lasts minutes (the sun moves a degree
 * every four) at one instant is unreliable there.
 */
export function sunNearEdge(sky: Sky, marginDeg: number): boolean {
  if (sky.sunDirection === null || sky.sunElevationDeg <= 0) return false;
  const signature = (az: number, el: number) => {
    const sun = directionFromAzimuthElevation(az, el);
    return [seenAt(sky, az, el), ...sky.reflectors.map((r) => sunImageDirection(r, sun, azimuthElevationOf) !== null)].join();
  };
  const a = sky.sunAzimuthDeg;
  const e = sky.sunElevationDeg;
  const here = signature(a, e);
  const da = marginDeg / Math.max(0.2, Math.cos(e / DEG));
  return [
    [a - da, e],
    [a + da, e],
    [a, e - marginDeg],
    [a, e + marginDeg],
  ].some(([x, y]) => signature(x!, y!) !== here);
}
