import { describe, expect, it } from 'vitest';
import { clampedCosineCoefficient } from '../../shared/sphere/clamped-cosine-ramamoorthi-hanrahan-2001';
import { directionFromAzimuthElevation, normalFromTiltAzimuth } from '../../shared/sphere/directions';
import { gaussLegendreOn } from '../../shared/sphere/gauss-legendre';
import { evaluateSh, normalizedLegendre, realShBasis, shCount, shIndex } from '../../shared/sphere/spherical-harmonics';
import { order2IrradianceForm, shBasisOrder2 } from '../../shared/sphere/sh-order2-ramamoorthi-hanrahan-2001';
import { projectGridOnSh, sphereGrid } from '../../shared/sphere/sphere-grid';

// Ramamoorthi & Hanrahan 2001 (JOSA A 18(10); SIGGRAPH 2001): E_lm = Â_l L_lm for the clamped-cosine kernel.
describe('clamped-cosine coefficients Â_l', () => {
  it('Â0 … Â6 = π, 2π/3, π/4, 0, −π/24, 0, π/64 (values from memory, reproduced — physics.md §3)', () => {
    const expected = [Math.PI, (2 * Math.PI) / 3, Math.PI / 4, 0, -Math.PI / 24, 0, Math.PI / 64];
    expected.forEach((v, l) => expect(Math.abs(clampedCosineCoefficient(l) - v)).toBeLessThan(1e-15));
  });
  it('the closed form equals 2π∫₀¹ x P_l(x) dx by Gauss–Legendre quadrature up to l = 40', () => {
    const g = gaussLegendreOn(40, 0, 1);
    const p = new Float64Array(((40 + 1) * (40 + 2)) / 2);
    for (let l = 0; l <= 40; l++) {
      let q = 0;
      for (let i = 0; i < g.x.length; i++) {
        normalizedLegendre(40, g.x[i]!, p);
        const pl = p[(l * (l + 1)) / 2]! * Math.sqrt((4 * Math.PI) / (2 * l + 1)); // P̄_l0 → P_l
        q += g.w[i]! * g.x[i]! * pl;
      }
      expect(Math.abs(2 * Math.PI * q - clampedCosineCoefficient(l))).toBeLessThan(1e-13);
    }
  });
  // R&H printed the constants from 6-digit Y_lm factors (e.g. 3 · π/4 · 0.315392 = 0.743125 vs 0.7431239 exact): tol 2e-6
  it('quadratic-form constants c1…c5 = 0.429043, 0.511664, 0.743125, 0.886227, 0.247708 (from memory, reproduced)', () => {
    const y = realShBasis(2, [1, 0, 0]);
    const yz = realShBasis(2, [0, 0, 1]);
    const a = [0, 1, 2].map(clampedCosineCoefficient);
    expect(Math.abs(a[2]! * y[shIndex(2, 2)]! - 0.429043)).toBeLessThan(2e-6); // c1 = Â2 · 0.546274
    expect(Math.abs((a[1]! * y[shIndex(1, 1)]!) / 2 - 0.511664)).toBeLessThan(2e-6); // c2 = Â1 · 0.488603 / 2
    expect(Math.abs(a[2]! * 1.5 * yz[shIndex(2, 0)]! - 0.743125)).toBeLessThan(2e-6); // c3 = 3 Â2 · 0.315392
    expect(Math.abs(a[0]! * y[0]! - 0.886227)).toBeLessThan(2e-6); // c4 = Â0 · 0.282095
    expect(Math.abs((a[2]! * yz[shIndex(2, 0)]!) / 2 - 0.247708)).toBeLessThan(2e-6); // c5 = Â2 · 0.315392
  });
});

describe('order-2 reconstruction of a point source (physics.md §3, exact [SC])', () => {
  it('E2(0) = 1.0625, E2(90°) = 0.09375 (the 9.4 % worst case), E2(180°) = 0.0625', () => {
    const s = directionFromAzimuthElevation(0, 90);
    const coeff = realShBasis(2, s); // L_lm of a unit-irradiance point source = Y_lm(s)
    for (let l = 0; l <= 2; l++) for (let m = -l; m <= l; m++) coeff[shIndex(l, m)] = coeff[shIndex(l, m)]! * clampedCosineCoefficient(l);
    expect(evaluateSh(2, coeff, normalFromTiltAzimuth(0, 0))).toBeCloseTo(1.0625, 12);
    expect(evaluateSh(2, coeff, normalFromTiltAzimuth(90, 33))).toBeCloseTo(0.09375, 12);
    expect(evaluateSh(2, coeff, normalFromTiltAzimuth(180, 0))).toBeCloseTo(0.0625, 12);
  });
});

describe('projection on the sphere grid', () => {
  it('is orthonormal up to order 24', () => {
    const grid = sphereGrid(64, 360);
    const order = 24;
    const vals = new Float64Array(grid.nRows * grid.nAzimuth);
    const basis = new Float64Array(shCount(order));
    const picks: [number, number][] = [
      [0, 0],
      [3, -2],
      [7, 5],
      [24, 24],
      [24, -13],
    ];
    for (const [l, m] of picks) {
      for (let i = 0; i < grid.nRows; i++) {
        for (let j = 0; j < grid.nAzimuth; j++) {
          realShBasis(order, directionFromAzimuthElevation(grid.columnAzimuthDeg[j]!, grid.rowElevationDeg[i]!), basis);
          vals[i * grid.nAzimuth + j] = basis[shIndex(l, m)]!;
        }
      }
      const c = projectGridOnSh(grid, vals, order);
      c.forEach((v, k) => expect(Math.abs(v - (k === shIndex(l, m) ? 1 : 0))).toBeLessThan(1e-10));
    }
  });
  it('isotropic upper hemisphere: even l ≥ 2 vanish and l ≤ 1 already gives π(1 + cos β)/2', () => {
    const grid = sphereGrid(32, 64);
    const vals = new Float64Array(grid.nRows * grid.nAzimuth);
    for (let i = 0; i < grid.nHalf; i++) vals.fill(1, i * grid.nAzimuth, (i + 1) * grid.nAzimuth);
    const c = projectGridOnSh(grid, vals, 6);
    for (const l of [2, 4, 6]) expect(Math.abs(c[shIndex(l, 0)]!)).toBeLessThan(1e-12);
    const e1 = c.slice(0, 4);
    for (let l = 0; l <= 1; l++) for (let m = -l; m <= l; m++) e1[shIndex(l, m)] = e1[shIndex(l, m)]! * clampedCosineCoefficient(l);
    for (const b of [0, 30, 60, 90, 150]) {
      expect(evaluateSh(1, e1, normalFromTiltAzimuth(b, 40))).toBeCloseTo((Math.PI * (1 + Math.cos((b * Math.PI) / 180))) / 2, 12);
    }
  });
});

describe('why sharp sources stay out of the harmonics', () => {
  it('kernel truncation leaves a point source a worst case of ≈ 1.25 % at order 24 (3.4 % at 8) — derived from Â_l', () => {
    const worst = (order: number) => {
      const s = directionFromAzimuthElevation(0, 90);
      const c = realShBasis(order, s);
      for (let l = 0; l <= order; l++) for (let m = -l; m <= l; m++) c[shIndex(l, m)] = c[shIndex(l, m)]! * clampedCosineCoefficient(l);
      let w = 0;
      for (let t = 0; t <= 180; t += 0.25)
        w = Math.max(w, Math.abs(evaluateSh(order, c, normalFromTiltAzimuth(t, 0)) - Math.max(0, Math.cos((t * Math.PI) / 180))));
      return w;
    };
    expect(Math.abs(worst(2) - 0.09375)).toBeLessThan(1e-9);
    expect(Math.abs(worst(8) - 0.0336)).toBeLessThan(5e-4);
    expect(Math.abs(worst(24) - 0.0125)).toBeLessThan(5e-4);
  });
});

// Ramamoorthi & Hanrahan 2001 (SIGGRAPH, Eq. 3) print the degree-2 basis with 6-digit constants; the simulator's fast
// field uses them. They are the same basis as realShBasis, rounded: each constant within 5e-7, each value within 1e-6
// (Y20 = 0.315392·(3z² − 1) doubles the rounding at the poles).
describe('order-2 basis with the printed constants', () => {
  it('matches realShBasis(2, d) within 1e-6 at 200 directions, same layout', () => {
    const out = new Float64Array(9);
    let worst = 0;
    for (let i = 0; i < 200; i++) {
      const d = directionFromAzimuthElevation((i * 137.5) % 360, -90 + (180 * (i + 0.5)) / 200);
      shBasisOrder2(d[0], d[1], d[2], out);
      const exact = realShBasis(2, d);
      for (let j = 0; j < 9; j++) worst = Math.max(worst, Math.abs(out[j]! - exact[j]!));
    }
    expect(worst).toBeLessThan(1e-6);
    expect(worst).toBeGreaterThan(1e-8); // rounded constants, not the exact basis
  });
  it("irradiance form: uniform radiance L = 1 gives E = π on every plane (Â0·4π·Y00² = π, to the constants' rounding)", () => {
    const c = new Float64Array(9);
    c[0] = 4 * Math.PI * 0.282095; // ∫ 1·Y00 dω with the printed Y00
    const f = order2IrradianceForm(c);
    for (const b of [0, 45, 90, 135, 180]) {
      const [x, y, z] = normalFromTiltAzimuth(b, 70);
      const e =
        f.k0 + f.kx * x + f.ky * y + f.kz * z + f.kxy * x * y + f.kyz * y * z + f.kxz * x * z + f.kzz * z * z + f.kxx * (x * x - y * y);
      expect(Math.abs(e - Math.PI)).toBeLessThan(5e-6);
    }
  });
  it('irradiance form: radiance cos⁺θ (L00 = √π/2, L10 = √(π/3), L20 = √(5π)/8) gives E(up) = 127π/192 at order 2 (derived from Â_l)', () => {
    // E(up) = Σ Â_l L_l0 Y_l0(up) = π/4 + π/3 + 5π/64 (the exact, untruncated 2π/3 is 1.6 % higher).
    const c = new Float64Array(9);
    c[0] = Math.sqrt(Math.PI) / 2;
    c[2] = Math.sqrt(Math.PI / 3);
    c[6] = Math.sqrt(5 * Math.PI) / 8;
    const f = order2IrradianceForm(c);
    const up = f.k0 + f.kz + f.kzz;
    expect(Math.abs(up - (127 * Math.PI) / 192) / ((127 * Math.PI) / 192)).toBeLessThan(5e-6);
  });
});

describe('evaluation at one direction', () => {
  // Σ c_lm Y_lm(d) is the definition (the module's header); realShBasis gives every Y_lm(d), so the two must agree up to
  // the rounding of a different summation order.
  it('evaluateSh equals the term-by-term sum Σ c_lm Y_lm(d) at orders 0, 1, 7 and 24 (definition of the expansion)', () => {
    for (const order of [0, 1, 7, 24]) {
      const c = new Float64Array(shCount(order)).map((_, i) => Math.sin(1.7 * i + 0.3) / (1 + i / 30));
      for (let i = 0; i < 200; i++) {
        const d = directionFromAzimuthElevation((i * 137.5) % 360, -89 + ((i * 61) % 179));
        const y = realShBasis(order, d);
        let direct = 0;
        for (let k = 0; k < c.length; k++) direct += c[k]! * y[k]!;
        expect(Math.abs(evaluateSh(order, c, d) - direct)).toBeLessThan(1e-12 * (1 + Math.abs(direct)));
      }
    }
  });
  it('at the zenith only m = 0 terms survive: Σ_l c_l0 √((2l+1)/4π) (P_l(1) = 1)', () => {
    const order = 24;
    const c = new Float64Array(shCount(order)).map((_, i) => 1 + (i % 5));
    let expected = 0;
    for (let l = 0; l <= order; l++) expected += c[shIndex(l, 0)]! * Math.sqrt((2 * l + 1) / (4 * Math.PI));
    expect(Math.abs(evaluateSh(order, c, [0, 0, 1]) - expected)).toBeLessThan(1e-12 * expected);
  });
});
