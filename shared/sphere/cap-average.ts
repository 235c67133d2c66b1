/**
 * Average over a spherical cap (all directions within angular radius r of a normal): a rotation-invariant (zonal)
 * low-pass filter. By the Funk–Hecke theorem its spherical-harmonic multipliers are
 * K_l = 2π ∫_{cos r}^{1} P_l(t) dt / Ω = (P_{l−1}(cos r) − P_{l+1}(cos r)) / ((2l + 1)(1 − cos r)), K_0 = 1,
 * using ∫ P_l = (P_{l+1} − P_{l−1})/(2l + 1). For a point source the cap-averaged clamped cosine is tabulated as a
 * function of the angle γ between the normal and the source (exact θ-integral, Gauss–Legendre in the cap radius).
 */
import { gaussLegendreOn } from './gauss-legendre';

/** Legendre polynomials P_0 … P_n at x. */
function legendreSeries(n: number, x: number): Float64Array {
  const p = new Float64Array(n + 1);
  p[0] = 1;
  if (n >= 1) p[1] = x;
  for (let l = 2; l <= n; l++) p[l] = ((2 * l - 1) * x * p[l - 1]! - (l - 1) * p[l - 2]!) / l;
  return p;
}

/** Multipliers K_0 … K_order of the cap average of angular radius `radiusRad`. */
export function capAverageMultipliers(order: number, radiusRad: number): Float64Array {
  const k = new Float64Array(order + 1).fill(1);
  if (radiusRad <= 0) return k;
  const x = Math.cos(radiusRad);
  const p = legendreSeries(order + 1, x);
  for (let l = 1; l <= order; l++) k[l] = (p[l - 1]! - p[l + 1]!) / ((2 * l + 1) * (1 - x));
  return k;
}

const TABLE_STEPS = 1440;
const tableCache = new Map<number, Float64Array>();

/** Table of the cap-averaged max(0, cos γ) for γ = 0 … π in TABLE_STEPS equal steps. */
export function capAveragedClampedCosineTable(radiusRad: number): Float64Array {
  const hit = tableCache.get(radiusRad);
  if (hit) return hit;
  const t = new Float64Array(TABLE_STEPS + 1);
  const g = gaussLegendreOn(48, 0, radiusRad);
  const capSolidAngle = 2 * Math.PI * (1 - Math.cos(radiusRad));
  for (let k = 0; k <= TABLE_STEPS; k++) {
    const gamma = (Math.PI * k) / TABLE_STEPS;
    if (radiusRad <= 0) {
      t[k] = Math.max(0, Math.cos(gamma));
      continue;
    }
    let sum = 0;
    for (let i = 0; i < g.x.length; i++) {
      const rho = g.x[i]!;
      const a = Math.cos(gamma) * Math.cos(rho);
      const b = Math.sin(gamma) * Math.sin(rho);
      // ∫_0^{2π} max(0, a + b cos θ) dθ
      let inner: number;
      if (a >= b) inner = 2 * Math.PI * a;
      else if (a <= -b) inner = 0;
      else inner = 2 * (a * Math.acos(-a / b) + Math.sqrt(b * b - a * a));
      sum += g.w[i]! * inner * Math.sin(rho);
    }
    t[k] = sum / capSolidAngle;
  }
  tableCache.set(radiusRad, t);
  return t;
}

/** Look up the table at cos γ (linear interpolation in γ). */
export function lookupCapTable(table: Float64Array, cosGamma: number): number {
  const gamma = Math.acos(Math.max(-1, Math.min(1, cosGamma)));
  const x = (gamma / Math.PI) * TABLE_STEPS;
  const k = Math.min(TABLE_STEPS - 1, Math.floor(x));
  const f = x - k;
  return table[k]! * (1 - f) + table[k + 1]! * f;
}
