/**
 * Real, orthonormal spherical harmonics Y_lm on the unit sphere, their projection from a product quadrature grid
 * and their evaluation at single directions and on tilt × azimuth grids.
 *
 * Frame: polar angle θ from the zenith (z = up), longitude φ = atan2(north, east) = 90° − azimuth.
 * Y_l0 = P̄_l0(cos θ); Y_lm = √2 P̄_lm(cos θ) cos(mφ) for m > 0; Y_l,−m = √2 P̄_lm(cos θ) sin(mφ);
 * P̄_lm = √((2l+1)/(4π) (l−m)!/(l+m)!) P_l^m are the fully normalised associated Legendre functions (no Condon–Shortley
 * phase), computed with the standard three-term recurrences in l (stable to high order).
 * Coefficient layout: index l² + l + m, m = −l … l.
 */
import type { Vec3 } from './directions';

export function shCount(order: number): number {
  return (order + 1) * (order + 1);
}

export function shIndex(l: number, m: number): number {
  return l * l + l + m;
}

/** Index of P̄_lm (0 ≤ m ≤ l) in a triangular table. */
export function legendreIndex(l: number, m: number): number {
  return (l * (l + 1)) / 2 + m;
}

/** The recurrence factors of P̄_lm that depend on l and m alone, per order (computed once: the square roots dominated). */
interface LegendreFactors {
  /** √((2m+1)/(2m)) for m ≥ 1: P̄_mm = factor · sin θ · P̄_m−1,m−1. */
  diagonal: Float64Array;
  /** √(2m+3): P̄_m+1,m = factor · x · P̄_mm. */
  next: Float64Array;
  /** a_lm = √((4l²−1)/(l²−m²)) and b_lm = √(((l−1)²−m²)/(4(l−1)²−1)), at legendreIndex(l, m), for l ≥ m + 2. */
  a: Float64Array;
  b: Float64Array;
}

const legendreFactors = new Map<number, LegendreFactors>();

function factorsFor(order: number): LegendreFactors {
  let f = legendreFactors.get(order);
  if (f) return f;
  const n = ((order + 1) * (order + 2)) / 2;
  f = { diagonal: new Float64Array(order + 1), next: new Float64Array(order + 1), a: new Float64Array(n), b: new Float64Array(n) };
  for (let m = 0; m <= order; m++) {
    if (m > 0) f.diagonal[m] = Math.sqrt((2 * m + 1) / (2 * m));
    f.next[m] = Math.sqrt(2 * m + 3);
    for (let l = m + 2; l <= order; l++) {
      f.a[legendreIndex(l, m)] = Math.sqrt((4 * l * l - 1) / (l * l - m * m));
      f.b[legendreIndex(l, m)] = Math.sqrt(((l - 1) * (l - 1) - m * m) / (4 * (l - 1) * (l - 1) - 1));
    }
  }
  legendreFactors.set(order, f);
  return f;
}

/** Fill `out` (length ≥ (order+1)(order+2)/2) with P̄_lm(x) for 0 ≤ m ≤ l ≤ order. */
export function normalizedLegendre(order: number, x: number, out: Float64Array): Float64Array {
  const { diagonal, next, a, b } = factorsFor(order);
  const s = Math.sqrt(Math.max(0, 1 - x * x));
  let pmm = Math.sqrt(1 / (4 * Math.PI));
  for (let m = 0; m <= order; m++) {
    if (m > 0) pmm *= diagonal[m]! * s;
    out[legendreIndex(m, m)] = pmm;
    if (m === order) break;
    let p1 = pmm;
    let p2 = x * next[m]! * pmm;
    out[legendreIndex(m + 1, m)] = p2;
    for (let l = m + 2; l <= order; l++) {
      const k = legendreIndex(l, m);
      const p = a[k]! * (x * p2 - b[k]! * p1);
      out[k] = p;
      p1 = p2;
      p2 = p;
    }
  }
  return out;
}

/** Evaluate all real Y_lm at a unit direction [east, north, up]. */
export function realShBasis(
  order: number,
  d: Vec3,
  out: Float64Array = new Float64Array(shCount(order)),
  scratch: Float64Array = new Float64Array(((order + 1) * (order + 2)) / 2),
): Float64Array {
  normalizedLegendre(order, d[2], scratch);
  const phi = Math.atan2(d[1], d[0]);
  const c1 = Math.cos(phi);
  const s1 = Math.sin(phi);
  let cm = 1;
  let sm = 0;
  for (let m = 0; m <= order; m++) {
    for (let l = m; l <= order; l++) {
      const p = scratch[legendreIndex(l, m)]!;
      if (m === 0) out[shIndex(l, 0)] = p;
      else {
        out[shIndex(l, m)] = Math.SQRT2 * p * cm;
        out[shIndex(l, -m)] = Math.SQRT2 * p * sm;
      }
    }
    const cn = cm * c1 - sm * s1;
    sm = sm * c1 + cm * s1;
    cm = cn;
  }
  return out;
}

/** Σ c_lm Y_lm(d). */
export function evaluateSh(
  order: number,
  coefficients: Float64Array,
  d: Vec3,
  scratch: Float64Array = new Float64Array(((order + 1) * (order + 2)) / 2),
): number {
  normalizedLegendre(order, d[2], scratch);
  const phi = Math.atan2(d[1], d[0]);
  const c1 = Math.cos(phi);
  const s1 = Math.sin(phi);
  // Indices step through the triangular Legendre table (k) and the coefficient layout (q = l² + l) as l rises, in
  // the same order of summation as Σ_m Σ_l, so the result is the same to the last bit as indexing each term afresh.
  let sum = 0;
  for (let l = 0, k = 0, q = 0; l <= order; l++) {
    sum += scratch[k]! * coefficients[q]!;
    k += l + 1;
    q += 2 * l + 2;
  }
  let cm = c1;
  let sm = s1;
  for (let m = 1; m <= order; m++) {
    let ac = 0;
    let as = 0;
    let k = legendreIndex(m, m);
    let q = m * m + m;
    for (let l = m; l <= order; l++) {
      const p = scratch[k]!;
      ac += p * coefficients[q + m]!;
      as += p * coefficients[q - m]!;
      k += l + 1;
      q += 2 * l + 2;
    }
    sum += Math.SQRT2 * (ac * cm + as * sm);
    const cn = cm * c1 - sm * s1;
    sm = sm * c1 + cm * s1;
    cm = cn;
  }
  return sum;
}

/**
 * Evaluate Σ c_lm Y_lm on the grid of normals (tilt_i, azimuth_j), row-major [i * nAz + j].
 * Separable: Legendre sums per tilt row (O(nTilt · order²)), then a Fourier sum per cell (O(nTilt · nAz · order)).
 */
export function evaluateShOnTiltAzimuthGrid(
  order: number,
  coefficients: Float64Array,
  tiltsDeg: ArrayLike<number>,
  azimuthsDeg: ArrayLike<number>,
): Float64Array {
  const nT = tiltsDeg.length;
  const nA = azimuthsDeg.length;
  const out = new Float64Array(nT * nA);
  const scratch = new Float64Array(((order + 1) * (order + 2)) / 2);
  // cos(mφ), sin(mφ) per column, φ = 90° − azimuth
  const cosT = new Float64Array(nA * (order + 1));
  const sinT = new Float64Array(nA * (order + 1));
  for (let j = 0; j < nA; j++) {
    const phi = ((90 - azimuthsDeg[j]!) * Math.PI) / 180;
    for (let m = 0; m <= order; m++) {
      cosT[j * (order + 1) + m] = Math.cos(m * phi);
      sinT[j * (order + 1) + m] = Math.sin(m * phi);
    }
  }
  const ac = new Float64Array(order + 1);
  const as = new Float64Array(order + 1);
  for (let i = 0; i < nT; i++) {
    normalizedLegendre(order, Math.cos((tiltsDeg[i]! * Math.PI) / 180), scratch);
    for (let m = 0; m <= order; m++) {
      let c = 0;
      let s = 0;
      for (let l = m; l <= order; l++) {
        const p = scratch[legendreIndex(l, m)]!;
        c += p * coefficients[shIndex(l, m)]!;
        if (m > 0) s += p * coefficients[shIndex(l, -m)]!;
      }
      ac[m] = m === 0 ? c : Math.SQRT2 * c;
      as[m] = Math.SQRT2 * s;
    }
    const row = i * nA;
    for (let j = 0; j < nA; j++) {
      const base = j * (order + 1);
      let sum = ac[0]!;
      for (let m = 1; m <= order; m++) sum += ac[m]! * cosT[base + m]! + as[m]! * sinT[base + m]!;
      out[row + j] = sum;
    }
  }
  return out;
}
