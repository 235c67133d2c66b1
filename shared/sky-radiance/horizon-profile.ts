/**
 * Horizon profile from a site survey: obstruction elevation as a piecewise-linear function of azimuth
 * (clockwise from north), periodic over 360°. Points must be sorted by non-decreasing azimuth in [0, 360); two points
 * at the same azimuth make a vertical edge (e.g. a building corner). Elevations are 0…90°. An empty profile is a
 * flat horizon. Directions below the profile (and above the true horizon) see the obstruction, not the sky.
 */
export interface HorizonProfile {
  /** Extended vertex azimuths (with one wrapped vertex before 0 and after 360). */
  az: Float64Array;
  el: Float64Array;
  /** Cumulative ∫ elevation d(azimuth) at each extended vertex, from the first one. */
  cumulative: Float64Array;
  empty: boolean;
  maxElevationDeg: number;
}

export function horizonProfile(points: readonly (readonly [number, number])[] = [], field = 'horizon'): HorizonProfile {
  for (let i = 0; i < points.length; i++) {
    const [a, e] = points[i]!;
    if (!Number.isFinite(a) || a < 0 || a >= 360)
      throw new RangeError(`${field}[${i}][0]: azimuth must be a finite number in [0, 360); got ${a}`);
    if (!Number.isFinite(e) || e < 0 || e > 90)
      throw new RangeError(`${field}[${i}][1]: elevation must be a finite number in [0, 90]; got ${e}`);
    if (i > 0 && a < points[i - 1]![0])
      throw new RangeError(
        `${field}: points must be sorted by azimuth (non-decreasing); point ${i} (${a}°) comes after ${points[i - 1]![0]}°`,
      );
  }
  if (points.length === 0) {
    return { az: Float64Array.of(-1, 361), el: Float64Array.of(0, 0), cumulative: Float64Array.of(0, 0), empty: true, maxElevationDeg: 0 };
  }
  const first = points[0]!;
  const last = points[points.length - 1]!;
  const az = [last[0] - 360, ...points.map((p) => p[0]), first[0] + 360];
  const el = [last[1], ...points.map((p) => p[1]), first[1]];
  const cumulative = new Float64Array(az.length);
  for (let i = 1; i < az.length; i++) cumulative[i] = cumulative[i - 1]! + ((az[i]! - az[i - 1]!) * (el[i]! + el[i - 1]!)) / 2;
  return { az: Float64Array.from(az), el: Float64Array.from(el), cumulative, empty: false, maxElevationDeg: Math.max(...el) };
}

function segmentOf(h: HorizonProfile, azimuthDeg: number): number {
  // last vertex index i with az[i] <= azimuth (binary search)
  let lo = 0;
  let hi = h.az.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (h.az[mid]! <= azimuthDeg) lo = mid;
    else hi = mid;
  }
  return lo;
}

function wrapAz(a: number): number {
  const r = a % 360;
  return r < 0 ? r + 360 : r;
}

/** Obstruction elevation (deg) at an azimuth; at a vertical edge, the larger of the two values. */
export function horizonElevationDeg(h: HorizonProfile, azimuthDeg: number): number {
  if (h.empty) return 0;
  const a = wrapAz(azimuthDeg);
  const i = segmentOf(h, a);
  const a0 = h.az[i]!;
  const a1 = h.az[i + 1]!;
  if (a1 - a0 < 1e-12) return Math.max(h.el[i]!, h.el[i + 1]!);
  let v = h.el[i]! + ((h.el[i + 1]! - h.el[i]!) * (a - a0)) / (a1 - a0);
  // vertical edge exactly at this azimuth
  if (a === a0 && i > 0 && h.az[i - 1] === a0) v = Math.max(v, h.el[i - 1]!);
  return v;
}

function cumulativeAt(h: HorizonProfile, a: number): number {
  const i = segmentOf(h, a);
  const a0 = h.az[i]!;
  const a1 = h.az[i + 1]!;
  if (a1 - a0 < 1e-12) return h.cumulative[i]!;
  const e0 = h.el[i]!;
  const ea = e0 + ((h.el[i + 1]! - e0) * (a - a0)) / (a1 - a0);
  return h.cumulative[i]! + ((a - a0) * (e0 + ea)) / 2;
}

/** Exact mean obstruction elevation (deg) over the azimuth band [a0, a1] with 0 ≤ a0 < a1 ≤ 360. */
export function horizonMeanElevationDeg(h: HorizonProfile, a0: number, a1: number): number {
  if (h.empty) return 0;
  return (cumulativeAt(h, a1) - cumulativeAt(h, a0)) / (a1 - a0);
}
