/**
 * The best reachable orientation: the panel normal a unit can reach (within its tilt and azimuth travel) that receives
 * the most irradiance, at a stated angular resolution. The one definition used by the fleet board, the trap detector,
 * the simulator's ground truth and the landscape view.
 *
 * Method: a coarse grid over the reachable range, then a hill climb on the `resolutionDeg` grid from each of the best
 * few coarse local maxima (the landscape of any sky is a sum of clamped-cosine lobes, so it is smooth at the coarse
 * scale; climbing from several candidates keeps a near-equal second peak from being missed). The answer lies on the
 * grid min + k·resolutionDeg of each axis (or on the upper limit), so it is within half a resolution step of the true
 * best orientation and never above the true best irradiance.
 * Check (derived from Lambert's law, physics.md): beam + isotropic sky + ground has the closed-form optimum
 * E_max = |v| + (D + ρG)/2 with v = DNI·s + ((D − ρG)/2)·up.
 * Angles in degrees: tilt from horizontal, azimuth clockwise from north; irradiance in W/m².
 */
import { normalFromTiltAzimuth, type Vec3, wrap360 } from '../sphere/directions';

/** The travel of a unit's two axes [°]. */
export interface UnitLimits {
  tiltRangeDeg: readonly [number, number];
  azimuthRangeDeg: readonly [number, number];
}

/** The travel of a standard unit (the simulator's default axes and the demo units): tilt 0…85°, any azimuth. */
export const STANDARD_UNIT_LIMITS: UnitLimits = { tiltRangeDeg: [0, 85], azimuthRangeDeg: [0, 360] };

/**
 * A settled unit getting less than this fraction of its best reachable irradiance is trapped: the simulator's ground
 * truth and the trap detector's default threshold.
 */
export const TRAP_RATIO = 0.85;

export interface BestOrientation {
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
}

/** Resolution of the best orientation where a caller states none [°]. */
export const BEST_ORIENTATION_RESOLUTION_DEG = 1;

export interface BestOrientationOptions {
  /** Angular resolution of the answer [°], 0.05…10; default `BEST_ORIENTATION_RESOLUTION_DEG`. */
  resolutionDeg?: number;
  /** Step of the first, coarse grid [°], at least the resolution; default 5. */
  coarseStepDeg?: number;
  /** How many coarse local maxima to climb from; default 3. */
  candidates?: number;
}

function checkLimits(l: UnitLimits): void {
  const [t0, t1] = l.tiltRangeDeg;
  const [a0, a1] = l.azimuthRangeDeg;
  if (![t0, t1, a0, a1].every(Number.isFinite))
    throw new RangeError(`limits: must be finite numbers; got tilt ${t0}…${t1}, azimuth ${a0}…${a1}`);
  if (t0 < 0 || t1 > 180 || t0 > t1) throw new RangeError(`tiltRangeDeg: must be [min, max] with 0 ≤ min ≤ max ≤ 180; got [${t0}, ${t1}]`);
  if (a0 > a1 || a1 - a0 > 360) throw new RangeError(`azimuthRangeDeg: must be [min, max] with min ≤ max ≤ min + 360; got [${a0}, ${a1}]`);
}

/** Grid points from lo to hi with a step, hi included (the last step may be shorter). */
function axisPoints(lo: number, hi: number, step: number, periodic: boolean): number[] {
  const n = Math.floor((hi - lo) / step + 1e-9);
  const pts = Array.from({ length: n + 1 }, (_, k) => lo + k * step);
  if (!periodic && hi - pts[pts.length - 1]! > 1e-9) pts.push(hi);
  if (periodic && hi - pts[pts.length - 1]! < 1e-9 && pts.length > 1) pts.pop(); // 360° is 0°
  return pts;
}

/**
 * Best reachable orientation for an irradiance function E(n) of the unit normal n = [east, north, up].
 * Throws a RangeError naming the bad limit or option.
 */
export function bestReachableOrientationWith(
  irradiance: (n: Vec3) => number,
  limits: UnitLimits,
  options: BestOrientationOptions = {},
): BestOrientation {
  checkLimits(limits);
  const res = options.resolutionDeg ?? BEST_ORIENTATION_RESOLUTION_DEG;
  if (!Number.isFinite(res) || res < 0.05 || res > 10) throw new RangeError(`resolutionDeg: must be a number in [0.05, 10]; got ${res}`);
  const coarse = options.coarseStepDeg ?? Math.max(5, res);
  if (!Number.isFinite(coarse) || coarse < res || coarse > 45)
    throw new RangeError(`coarseStepDeg: must be a number in [resolutionDeg, 45]; got ${coarse}`);
  const candidates = options.candidates ?? 3;
  const [tMin, tMax] = limits.tiltRangeDeg;
  const [aMin, aMax] = limits.azimuthRangeDeg;
  const periodic = aMax - aMin >= 360 - 1e-9;
  const e = (t: number, a: number) => irradiance(normalFromTiltAzimuth(t, a));

  // Coarse grid and its local maxima (a cell at least as bright as its 8 neighbours).
  const ts = axisPoints(tMin, tMax, coarse, false);
  const as = axisPoints(aMin, aMax, coarse, periodic);
  const v = ts.map((t) => as.map((a) => e(t, a)));
  const at = (i: number, j: number) => {
    if (i < 0 || i >= ts.length) return -Infinity;
    if (periodic) j = (j + as.length) % as.length;
    else if (j < 0 || j >= as.length) return -Infinity;
    return v[i]![j]!;
  };
  const peaks: { i: number; j: number; wm2: number }[] = [];
  for (let i = 0; i < ts.length; i++)
    for (let j = 0; j < as.length; j++) {
      const x = v[i]![j]!;
      let top = true;
      for (let di = -1; di <= 1 && top; di++)
        for (let dj = -1; dj <= 1; dj++)
          if ((di || dj) && at(i + di, j + dj) > x) {
            top = false;
            break;
          }
      if (top) peaks.push({ i, j, wm2: x });
    }
  peaks.sort((p, q) => q.wm2 - p.wm2);

  // Hill climb on the fine grid (index space: tilt tMin + k·res, azimuth aMin + k·res), each axis clamped or wrapped.
  const kTiltMax = Math.floor((tMax - tMin) / res + 1e-9);
  const kAzMax = periodic ? Math.round(360 / res) : Math.floor((aMax - aMin) / res + 1e-9);
  // A limit that is not on the fine grid is one extra index on its axis.
  const tiltTop = tMax - (tMin + kTiltMax * res) > 1e-9 ? kTiltMax + 1 : kTiltMax;
  const azTop = !periodic && aMax - (aMin + kAzMax * res) > 1e-9 ? kAzMax + 1 : kAzMax;
  const tiltOf = (k: number) => (k > kTiltMax ? tMax : tMin + k * res);
  const azOf = (k: number) => (periodic ? wrap360(aMin + k * res) : k > kAzMax ? aMax : aMin + k * res);
  let best: BestOrientation = { tiltDeg: tMin, azimuthDeg: periodic ? wrap360(aMin) : aMin, wm2: -Infinity };
  for (const p of peaks.slice(0, Math.max(1, candidates))) {
    let ki = Math.min(tiltTop, Math.round((ts[p.i]! - tMin) / res));
    let kj = Math.round((as[p.j]! - aMin) / res);
    if (!periodic) kj = Math.min(azTop, kj);
    let here = e(tiltOf(ki), azOf(kj));
    for (let guard = 0; guard < 100_000; guard++) {
      let move: [number, number, number] | null = null;
      for (let di = -1; di <= 1; di++)
        for (let dj = -1; dj <= 1; dj++) {
          if (!di && !dj) continue;
          const ni = ki + di;
          let nj = kj + dj;
          if (ni < 0 || ni > tiltTop) continue;
          if (!periodic && (nj < 0 || nj > azTop)) continue;
          if (periodic) nj = ((nj % kAzMax) + kAzMax) % kAzMax;
          const x = e(tiltOf(ni), azOf(nj));
          if (x > here && (!move || x > move[2])) move = [ni, nj, x];
        }
      if (!move) break;
      [ki, kj, here] = move;
    }
    if (here > best.wm2) best = { tiltDeg: tiltOf(ki), azimuthDeg: azOf(kj), wm2: here };
  }
  return best;
}
