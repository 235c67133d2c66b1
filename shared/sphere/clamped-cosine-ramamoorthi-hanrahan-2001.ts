/**
 * Spherical-harmonic coefficients of the clamped-cosine (Lambert) kernel max(0, cos γ).
 *
 * Source: R. Ramamoorthi and P. Hanrahan, "On the relationship between radiance and irradiance: determining the
 * illumination from images of a convex Lambertian object", J. Opt. Soc. Am. A 18(10) (2001) 2448–2459,
 * doi:10.1364/JOSAA.18.002448; and "An efficient representation for irradiance environment maps", SIGGRAPH 2001,
 * doi:10.1145/383259.383317. By the Funk–Hecke theorem irradiance is E_lm = Â_l L_lm with
 * Â_l = 2π ∫₀¹ x P_l(x) dx: Â0 = π, Â1 = 2π/3, odd l > 1: 0, even l ≥ 2: 2π (−1)^(l/2 − 1) / ((l + 2)(l − 1)) · l! / (2^l ((l/2)!)²).
 * Valid for any l ≥ 0 (computed with a ratio recurrence, no factorial overflow).
 */
export function clampedCosineCoefficient(l: number): number {
  if (l === 0) return Math.PI;
  if (l === 1) return (2 * Math.PI) / 3;
  if (l % 2 === 1) return 0;
  // c = l! / (2^l ((l/2)!)^2) = C(l, l/2) / 2^l, built by the ratio c_{k} = c_{k-1} (2k − 1)/(2k) for l = 2k.
  let c = 1;
  for (let k = 1; k <= l / 2; k++) c *= (2 * k - 1) / (2 * k);
  const sign = (l / 2 - 1) % 2 === 0 ? 1 : -1;
  return ((2 * Math.PI * sign) / ((l + 2) * (l - 1))) * c;
}

/** Â_0 … Â_order. */
export function clampedCosineCoefficients(order: number): Float64Array {
  const a = new Float64Array(order + 1);
  for (let l = 0; l <= order; l++) a[l] = clampedCosineCoefficient(l);
  return a;
}
