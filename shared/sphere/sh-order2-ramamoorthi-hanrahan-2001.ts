/**
 * Real spherical harmonics of degree ≤ 2 in Cartesian form, with the 6-digit constants as printed by
 * R. Ramamoorthi and P. Hanrahan, "An efficient representation for irradiance environment maps", SIGGRAPH 2001,
 * doi:10.1145/383259.383317 (Eq. 3): Y00 = 0.282095; Y1,−1 / Y10 / Y11 = 0.488603 · (y, z, x);
 * Y2,−2 / Y2,−1 / Y21 = 1.092548 · (xy, yz, xz); Y20 = 0.315392 (3z² − 1); Y22 = 0.546274 (x² − y²).
 * Same basis, frame and coefficient layout (index l² + l + m) as `realShBasis(2, d)` in spherical-harmonics.ts; the
 * printed constants are rounded to 6 decimals (each within 5e-7, for example 0.282095 against 1/(2√π) = 0.28209479…),
 * so each basis value differs from the exact one by less than 1e-6. This form is the fast one: the simulator evaluates it for every
 * reading, and its numbers are the ones the simulator has always used.
 * Input: unit vectors [east, north, up]; coefficients of radiance in W/(m²·sr), irradiance in W/m².
 */
import { clampedCosineCoefficient } from './clamped-cosine-ramamoorthi-hanrahan-2001';

/** The printed constants of the degree-2 basis. */
export const SH2_Y00 = 0.282095;
export const SH2_Y1 = 0.488603;
export const SH2_Y2_MIXED = 1.092548;
export const SH2_Y20 = 0.315392;
export const SH2_Y22 = 0.546274;

/** Writes the nine basis values at direction (x, y, z) into `out` from `offset`. */
export function shBasisOrder2(x: number, y: number, z: number, out: Float64Array, offset = 0): Float64Array {
  out[offset] = SH2_Y00;
  out[offset + 1] = SH2_Y1 * y;
  out[offset + 2] = SH2_Y1 * z;
  out[offset + 3] = SH2_Y1 * x;
  out[offset + 4] = SH2_Y2_MIXED * x * y;
  out[offset + 5] = SH2_Y2_MIXED * y * z;
  out[offset + 6] = SH2_Y20 * (3 * z * z - 1);
  out[offset + 7] = SH2_Y2_MIXED * x * z;
  out[offset + 8] = SH2_Y22 * (x * x - y * y);
  return out;
}

/**
 * Irradiance of an order-2 radiance expansion as a quadratic form in the normal n = (x, y, z):
 * E(n) = k0 + kx x + ky y + kz z + kxy xy + kyz yz + kxz xz + kzz z² + kxx (x² − y²), from E_lm = Â_l L_lm (Funk–Hecke).
 */
export interface Order2IrradianceForm {
  k0: number;
  kx: number;
  ky: number;
  kz: number;
  kxy: number;
  kyz: number;
  kxz: number;
  kzz: number;
  kxx: number;
}

/** The quadratic form of the irradiance for nine radiance coefficients L_lm (layout as `shBasisOrder2`). */
export function order2IrradianceForm(radiance: ArrayLike<number>): Order2IrradianceForm {
  const q = Array.from({ length: 9 }, (_, j) => radiance[j]! * clampedCosineCoefficient(j === 0 ? 0 : j < 4 ? 1 : 2));
  return {
    k0: q[0]! * SH2_Y00 - q[6]! * SH2_Y20,
    ky: q[1]! * SH2_Y1,
    kz: q[2]! * SH2_Y1,
    kx: q[3]! * SH2_Y1,
    kxy: q[4]! * SH2_Y2_MIXED,
    kyz: q[5]! * SH2_Y2_MIXED,
    kzz: q[6]! * SH2_Y20 * 3,
    kxz: q[7]! * SH2_Y2_MIXED,
    kxx: q[8]! * SH2_Y22,
  };
}
