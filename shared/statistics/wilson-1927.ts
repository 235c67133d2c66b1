/**
 * Wilson score interval for a binomial proportion: E. B. Wilson (1927), "Probable inference, the law of succession, and
 * statistical inference", Journal of the American Statistical Association 22(158):209–212.
 *
 * For k successes in n trials and the standard normal quantile z, the interval is the set of proportions p whose score
 * test does not reject: (p̂ + z²/2n ± z·√(p̂(1 − p̂)/n + z²/4n²)) / (1 + z²/n), p̂ = k/n. It stays inside [0, 1] and keeps
 * its coverage near the nominal level for small n and for p̂ near 0 or 1, where the normal-approximation interval fails.
 * Pure; no continuity correction.
 */

/** Two-sided 95 % standard normal quantile (1 − 0.05/2), to ten digits (common practice). */
export const Z_95 = 1.959963985;

export interface WilsonInterval {
  /** Lower and upper bound of the proportion (0…1). */
  low: number;
  high: number;
}

/**
 * Wilson score interval of `successes` out of `trials` at normal quantile `z` (default: two-sided 95 %).
 * Throws a RangeError naming the bad argument; `trials` = 0 has no interval (null).
 */
export function wilsonInterval(successes: number, trials: number, z = Z_95): WilsonInterval | null {
  if (!Number.isInteger(trials) || trials < 0) throw new RangeError(`trials: must be a whole number ≥ 0; got ${trials}`);
  if (!Number.isInteger(successes) || successes < 0 || successes > trials)
    throw new RangeError(`successes: must be a whole number in [0, trials = ${trials}]; got ${successes}`);
  if (!Number.isFinite(z) || z <= 0) throw new RangeError(`z: must be a finite number > 0; got ${z}`);
  if (trials === 0) return null;
  const n = trials;
  const p = successes / n;
  const z2 = z * z;
  const centre = p + z2 / (2 * n);
  const half = z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  const scale = 1 + z2 / n;
  // At p̂ = 0 or 1 one bound is exactly 0 or 1; the clamp only removes rounding below 0 or above 1.
  return {
    low: successes === 0 ? 0 : Math.max(0, (centre - half) / scale),
    high: successes === n ? 1 : Math.min(1, (centre + half) / scale),
  };
}
