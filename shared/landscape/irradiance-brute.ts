/**
 * Brute-force reference irradiance: E(n) = ∫ L(s) max(0, n·s) dΩ by direct quadrature, kept to test the fast method.
 *
 * The sphere is cut into 1° × 1° cells (equal steps in azimuth and elevation; exact cell solid angles). Each cell's
 * radiance is sampled at SUPER × SUPER points with the pointwise radiance function (extendedRadiance: point-in-polygon
 * tests for horizon and facades, no coverage formulas), and the cell is summarised by its flux vector
 * F = Σ L·ΔΩ·s, so a plane receives Σ max(0, n·F). The sun disc (and its facade images) is sampled with
 * DISC_SAMPLES points, each tested against the horizon profile and the facades; lamps are exact point sources.
 * Cost ≈ (number of normals) × 64 800 multiply-adds.
 */
import {
  azimuthElevationOf,
  directionFromAzimuthElevation,
  dot,
  normalFromTiltAzimuth,
  reflectDirection,
  type Vec3,
} from '../sphere/directions';
import { horizonElevationDeg } from '../sky-radiance/horizon-profile';
import { reflectorContains } from '../sky-radiance/facade-reflectors';
import { extendedRadiance, SUN_ANGULAR_RADIUS_DEG, type Sky } from '../sky-radiance/sky';

const SUPER = 3;
const CELL_DEG = 1;

interface BruteModel {
  /** Flux vectors of non-empty cells, packed [x, y, z, …]. */
  flux: Float64Array;
  /** Sharp sources: direction and irradiance at normal incidence, packed [x, y, z, I, …]. */
  sharp: Float64Array;
}

/** Sample points on the solar disc: centre plus rings, equal-area weights. */
function discSamples(centre: Vec3): Vec3[] {
  const rings = [1, 6, 12, 18, 24];
  const r = (SUN_ANGULAR_RADIUS_DEG * Math.PI) / 180;
  // orthonormal basis around centre
  const up: Vec3 = Math.abs(centre[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
  const u = normalize(cross(up, centre));
  const v = cross(centre, u);
  const out: Vec3[] = [];
  const nr = rings.length;
  for (let k = 0; k < nr; k++) {
    const count = rings[k]!;
    // ring k covers radii [k−0.5, k+0.5]/(nr−0.5) of the disc, approximately equal area per sample
    const rho = (k / (nr - 0.5)) * r;
    for (let q = 0; q < count; q++) {
      const ang = (2 * Math.PI * (q + 0.5 * (k % 2))) / count;
      const a = rho * Math.cos(ang);
      const b = rho * Math.sin(ang);
      out.push(normalize([centre[0] + a * u[0] + b * v[0], centre[1] + a * u[1] + b * v[1], centre[2] + a * u[2] + b * v[2]]));
    }
  }
  return out;
}

function discWeights(): number[] {
  const rings = [1, 6, 12, 18, 24];
  const nr = rings.length;
  const w: number[] = [];
  for (let k = 0; k < nr; k++) {
    const r0 = Math.max(0, (k - 0.5) / (nr - 0.5));
    const r1 = (k + 0.5) / (nr - 0.5);
    const area = r1 * r1 - r0 * r0;
    for (let q = 0; q < rings[k]!; q++) w.push(area / rings[k]!);
  }
  const s = w.reduce((a, b) => a + b, 0);
  return w.map((x) => x / s);
}

function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function normalize(a: Vec3): Vec3 {
  const n = Math.hypot(a[0], a[1], a[2]);
  return [a[0] / n, a[1] / n, a[2] / n];
}

function sunPointVisible(sky: Sky, s: Vec3): boolean {
  const { azimuthDeg, elevationDeg } = azimuthElevationOf(s);
  if (elevationDeg <= Math.max(0, horizonElevationDeg(sky.horizon, azimuthDeg))) return false;
  return !sky.reflectors.some((r) => reflectorContains(r, azimuthDeg, elevationDeg));
}

function bruteModel(sky: Sky): BruteModel {
  const key = 'brute';
  const hit = sky.cache.get(key) as BruteModel | undefined;
  if (hit) return hit;
  const RAD = Math.PI / 180;
  const nEl = 180 / CELL_DEG;
  const nAz = 360 / CELL_DEG;
  const flux: number[] = [];
  for (let i = 0; i < nEl; i++) {
    const e0 = -90 + i * CELL_DEG;
    const solid = (Math.sin((e0 + CELL_DEG) * RAD) - Math.sin(e0 * RAD)) * CELL_DEG * RAD;
    for (let j = 0; j < nAz; j++) {
      const a0 = j * CELL_DEG;
      let fx = 0;
      let fy = 0;
      let fz = 0;
      // samples equally spaced in azimuth and in sin(elevation) (equal solid angle each)
      const z0 = Math.sin(e0 * RAD);
      const z1 = Math.sin((e0 + CELL_DEG) * RAD);
      for (let p = 0; p < SUPER; p++) {
        const z = z0 + ((p + 0.5) / SUPER) * (z1 - z0);
        const el = Math.asin(z) / RAD;
        for (let q = 0; q < SUPER; q++) {
          const az = a0 + ((q + 0.5) / SUPER) * CELL_DEG;
          const d = directionFromAzimuthElevation(az, el);
          const L = extendedRadiance(sky, d);
          fx += L * d[0];
          fy += L * d[1];
          fz += L * d[2];
        }
      }
      const w = solid / (SUPER * SUPER);
      if (fx !== 0 || fy !== 0 || fz !== 0) flux.push(fx * w, fy * w, fz * w);
    }
  }
  const sharp: number[] = [];
  if (sky.sunDirection && sky.dniWm2 > 0) {
    const samples = discSamples(sky.sunDirection);
    const weights = discWeights();
    samples.forEach((s, k) => {
      const wk = weights[k]! * sky.dniWm2;
      if (sunPointVisible(sky, s)) sharp.push(s[0], s[1], s[2], wk);
      for (const r of sky.reflectors) {
        if (dot(s, r.normal) <= 0) continue;
        const v = reflectDirection(s, r.normal);
        const { azimuthDeg, elevationDeg } = azimuthElevationOf(v);
        if (reflectorContains(r, azimuthDeg, elevationDeg)) sharp.push(v[0], v[1], v[2], wk * r.reflectance);
      }
    });
  }
  for (const l of sky.lamps) sharp.push(l.direction[0], l.direction[1], l.direction[2], l.irradianceWm2);
  const model = { flux: Float64Array.from(flux), sharp: Float64Array.from(sharp) };
  sky.cache.set(key, model);
  return model;
}

/** Brute-force irradiance on one plane (W/m²). */
export function irradianceBruteAtNormal(sky: Sky, n: Vec3): number {
  const { flux, sharp } = bruteModel(sky);
  const [nx, ny, nz] = n;
  let e = 0;
  for (let k = 0; k < flux.length; k += 3) {
    const c = nx * flux[k]! + ny * flux[k + 1]! + nz * flux[k + 2]!;
    if (c > 0) e += c;
  }
  for (let k = 0; k < sharp.length; k += 4) {
    const c = nx * sharp[k]! + ny * sharp[k + 1]! + nz * sharp[k + 2]!;
    if (c > 0) e += c * sharp[k + 3]!;
  }
  return e;
}

/** Brute-force landscape on a tilt × azimuth grid. */
export function landscapeBruteValues(sky: Sky, tiltsDeg: Float64Array, azimuthsDeg: Float64Array): Float64Array {
  const out = new Float64Array(tiltsDeg.length * azimuthsDeg.length);
  for (let i = 0; i < tiltsDeg.length; i++) {
    for (let j = 0; j < azimuthsDeg.length; j++)
      out[i * azimuthsDeg.length + j] = irradianceBruteAtNormal(sky, normalFromTiltAzimuth(tiltsDeg[i]!, azimuthsDeg[j]!));
  }
  return out;
}
