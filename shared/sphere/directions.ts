/**
 * Directions on the unit sphere in the site's east–north–up frame, and the angle conventions of the engine:
 * azimuth clockwise from true north, elevation above the horizontal; a panel normal is given by tilt from
 * horizontal (0 = facing straight up) and azimuth clockwise from north, so tilt = 90° − elevation of the normal.
 */
export type Vec3 = [number, number, number];

const RAD = Math.PI / 180;
const DEG = 180 / Math.PI;

/** Unit vector [east, north, up] from azimuth (clockwise from north) and elevation, degrees. */
export function directionFromAzimuthElevation(azimuthDeg: number, elevationDeg: number): Vec3 {
  const a = azimuthDeg * RAD;
  const e = elevationDeg * RAD;
  const c = Math.cos(e);
  return [Math.sin(a) * c, Math.cos(a) * c, Math.sin(e)];
}

/** Unit normal [east, north, up] of a plane with tilt from horizontal and azimuth clockwise from north, degrees. */
export function normalFromTiltAzimuth(tiltDeg: number, azimuthDeg: number): Vec3 {
  const t = tiltDeg * RAD;
  const a = azimuthDeg * RAD;
  const s = Math.sin(t);
  return [s * Math.sin(a), s * Math.cos(a), Math.cos(t)];
}

/** Azimuth (clockwise from north, 0…360) and elevation (−90…90) of a vector, degrees. */
export function azimuthElevationOf(v: Vec3): { azimuthDeg: number; elevationDeg: number } {
  const h = Math.hypot(v[0], v[1]);
  let az = Math.atan2(v[0], v[1]) * DEG;
  if (az < 0) az += 360;
  return { azimuthDeg: h < 1e-15 ? 0 : az, elevationDeg: Math.atan2(v[2], h) * DEG };
}

/** Tilt (0…180) and azimuth (0…360) of a normal vector, degrees. */
export function tiltAzimuthOf(n: Vec3): { tiltDeg: number; azimuthDeg: number } {
  const { azimuthDeg, elevationDeg } = azimuthElevationOf(n);
  return { tiltDeg: 90 - elevationDeg, azimuthDeg };
}

export function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/** Mirror image of direction d in a plane with unit normal m: d − 2(d·m)m. */
export function reflectDirection(d: Vec3, m: Vec3): Vec3 {
  const k = 2 * dot(d, m);
  return [d[0] - k * m[0], d[1] - k * m[1], d[2] - k * m[2]];
}

/** Angle between two unit vectors, degrees. */
export function angleBetweenDeg(a: Vec3, b: Vec3): number {
  return Math.acos(Math.max(-1, Math.min(1, dot(a, b)))) * DEG;
}

/**
 * Wrap an angle to [0, 360). Written as ((x % 360) + 360) % 360, the form every caller used before it had one home, so
 * results stay bit-identical (the extra +360 − 360 can move the last bit of a positive angle).
 */
export function wrap360(x: number): number {
  return ((x % 360) + 360) % 360;
}
