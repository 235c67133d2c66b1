/**
 * Relative sky luminance distribution of the CIE standard general sky.
 *
 * Source: CIE S 011/E:2003 / ISO 15469:2004 "Spatial distribution of daylight — CIE standard general sky";
 * parameter groups after S. Darula and R. Kittler, "CIE general sky standard defining luminance distributions",
 * Proc. eSim 2002 (Montréal). L(Z, χ)/Lz = f(χ) φ(Z) / (f(Zs) φ(0)), gradation φ(Z) = 1 + a·exp(b / cos Z) (φ(90°) = 1),
 * indicatrix f(χ) = 1 + c[exp(dχ) − exp(dπ/2)] + e·cos²χ, χ the angle between the sky element and the sun (radians).
 * Valid for sky elements with Z in 0…90° and any sun zenith (the 15 types are defined for the sun above the horizon;
 * below it the formula is continued unchanged). Luminance shape is used as radiance shape (same relative distribution).
 */

/** Gradation groups I…VI: [a, b]. */
export const CIE_GRADATION: Readonly<Record<'I' | 'II' | 'III' | 'IV' | 'V' | 'VI', readonly [number, number]>> = {
  I: [4.0, -0.7],
  II: [1.1, -0.8],
  III: [0.0, -1.0],
  IV: [-1.0, -0.55],
  V: [-1.0, -0.32],
  VI: [-1.0, -0.15],
};

/** Indicatrix groups 1…6: [c, d, e]. */
export const CIE_INDICATRIX: Readonly<Record<1 | 2 | 3 | 4 | 5 | 6, readonly [number, number, number]>> = {
  1: [0, -1.0, 0],
  2: [2, -1.5, 0.15],
  3: [5, -2.5, 0.3],
  4: [10, -3.0, 0.45],
  5: [16, -3.0, 0.3],
  6: [24, -2.8, 0.15],
};

/** The 15 standard types as (gradation group, indicatrix group). */
export const CIE_SKY_TYPES: readonly (readonly [keyof typeof CIE_GRADATION, keyof typeof CIE_INDICATRIX, string])[] = [
  ['I', 1, 'overcast, steep gradation, azimuthal uniformity'],
  ['I', 2, 'overcast, steep gradation, slight brightening toward the sun'],
  ['II', 1, 'overcast, moderate gradation, azimuthal uniformity'],
  ['II', 2, 'overcast, moderate gradation, slight brightening toward the sun'],
  ['III', 1, 'sky of uniform luminance'],
  ['III', 2, 'partly cloudy, no gradation toward the zenith, slight brightening toward the sun'],
  ['III', 3, 'partly cloudy, no gradation toward the zenith, brighter circumsolar region'],
  ['III', 4, 'partly cloudy, no gradation toward the zenith, distinct solar corona'],
  ['IV', 2, 'partly cloudy, obscured sun'],
  ['IV', 3, 'partly cloudy, brighter circumsolar region'],
  ['IV', 4, 'white-blue sky, distinct solar corona'],
  ['V', 4, 'CIE standard clear sky, low turbidity'],
  ['V', 5, 'CIE standard clear sky, polluted atmosphere'],
  ['VI', 5, 'cloudless turbid sky, broad solar corona'],
  ['VI', 6, 'white-blue turbid sky, broad solar corona'],
];

export interface CieParameters {
  a: number;
  b: number;
  c: number;
  d: number;
  e: number;
}

export function cieParameters(skyType: number): CieParameters {
  const t = CIE_SKY_TYPES[skyType - 1];
  if (!Number.isInteger(skyType) || !t)
    throw new RangeError(`skyType: CIE standard general sky type must be an integer 1…15; got ${skyType}`);
  const [a, b] = CIE_GRADATION[t[0]];
  const [c, d, e] = CIE_INDICATRIX[t[1]];
  return { a, b, c, d, e };
}

export function cieGradation(p: CieParameters, zenithRad: number): number {
  const cz = Math.cos(zenithRad);
  return cz <= 1e-9 ? 1 : 1 + p.a * Math.exp(p.b / cz);
}

export function cieIndicatrix(p: CieParameters, chiRad: number): number {
  const cc = Math.cos(chiRad);
  return 1 + p.c * (Math.exp(p.d * chiRad) - Math.exp((p.d * Math.PI) / 2)) + p.e * cc * cc;
}

/** L(Z, χ)/Lz for an element at zenith Z and azimuth difference ΔAz from a sun at zenith Zs (all radians). */
export function cieRelativeLuminance(skyType: number, zenithRad: number, deltaAzimuthRad: number, sunZenithRad: number): number {
  const p = cieParameters(skyType);
  const cosChi = Math.cos(sunZenithRad) * Math.cos(zenithRad) + Math.sin(sunZenithRad) * Math.sin(zenithRad) * Math.cos(deltaAzimuthRad);
  const chi = Math.acos(Math.max(-1, Math.min(1, cosChi)));
  return (cieIndicatrix(p, chi) * cieGradation(p, zenithRad)) / (cieIndicatrix(p, sunZenithRad) * cieGradation(p, 0));
}
