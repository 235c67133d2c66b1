import { describe, expect, it } from 'vitest';
import {
  bestReachableOrientation,
  bestReachableOrientationWith,
  buildSky,
  irradianceAt,
  STANDARD_UNIT_LIMITS,
  type UnitLimits,
} from '../../shared/landscape/index';
import { directionFromAzimuthElevation, dot, normalFromTiltAzimuth, type Vec3 } from '../../shared/sphere/directions';

// Global optimum with beam + isotropic sky + ground (physics.md, derived from Lambert's cosine law):
// E(n) = DNI·max(0, n·s) + D(1 + n_z)/2 + ρG(1 − n_z)/2, maximal at n ∥ v = DNI·s + ((D − ρG)/2)·up, E_max = |v| + (D + ρG)/2.
// Example: DNI 100, sun elevation 30° (south), D 300, ρ 0.2, G = D + DNI·sin 30° = 350 → normal elevation 62.307°,
// E_max = 371.347 W/m².
const DNI = 100;
const D = 300;
const RHO = 0.2;
const G = D + DNI * Math.sin(Math.PI / 6);
const SUN = directionFromAzimuthElevation(180, 30);
const closedForm = (n: Vec3) => DNI * Math.max(0, dot(n, SUN)) + (D * (1 + n[2])) / 2 + (RHO * G * (1 - n[2])) / 2;
const ANY: UnitLimits = { tiltRangeDeg: [0, 90], azimuthRangeDeg: [0, 360] };

describe('best reachable orientation', () => {
  it('closed form: tilt 90° − 62.307°, azimuth 180°, 371.347 W/m² at 0.1° resolution', () => {
    const b = bestReachableOrientationWith(closedForm, ANY, { resolutionDeg: 0.1 });
    expect(Math.abs(b.tiltDeg - (90 - 62.307))).toBeLessThanOrEqual(0.05 + 1e-9);
    expect(Math.abs(b.azimuthDeg - 180)).toBeLessThan(1e-9);
    expect(b.wm2).toBeLessThanOrEqual(371.347 + 5e-4);
    expect(b.wm2).toBeGreaterThan(371.347 - 5e-3);
  });

  it('at the stated resolution: 1° gives tilt 28° (the grid point nearest 27.693°), never above E_max', () => {
    const b = bestReachableOrientationWith(closedForm, ANY, { resolutionDeg: 1 });
    expect(b.tiltDeg).toBe(28);
    expect(b.azimuthDeg).toBe(180);
    expect(b.wm2).toBeCloseTo(closedForm(normalFromTiltAzimuth(28, 180)), 12);
    expect(b.wm2).toBeLessThan(371.347 + 5e-4);
  });

  it('the engine sky of the same example gives the same optimum (fast irradiance, within 0.05 W/m²)', () => {
    const sky = buildSky({
      sun: { azimuthDeg: 180, elevationDeg: 30, dniWm2: DNI },
      dhiWm2: D,
      ghiWm2: G,
      skyType: 'isotropic',
      albedo: RHO,
    });
    const b = bestReachableOrientation(sky, ANY, { resolutionDeg: 0.5 });
    expect(Math.abs(b.tiltDeg - 27.693)).toBeLessThanOrEqual(0.25 + 1e-9);
    expect(b.azimuthDeg).toBe(180);
    expect(Math.abs(b.wm2 - 371.347)).toBeLessThan(0.05);
    expect(b.wm2).toBeCloseTo(irradianceAt(sky, b.tiltDeg, b.azimuthDeg), 9);
  });

  it('a dark sky (no sun, no sky light, no lamps) is 0 W/m² at the first reachable orientation, without building the fast model', () => {
    const sky = buildSky({ sun: null, dhiWm2: 0, ghiWm2: 0, skyType: 'isotropic', albedo: RHO });
    const b = bestReachableOrientation(sky, { tiltRangeDeg: [5, 80], azimuthRangeDeg: [90, 270] });
    expect(b).toEqual({ tiltDeg: 5, azimuthDeg: 90, wm2: 0 });
    expect([...sky.cache.keys()].filter((k) => k.startsWith('fast'))).toEqual([]);
    // The sky really is dark: its irradiance is 0 where the search would have looked.
    expect(irradianceAt(sky, 40, 180)).toBe(0);
  });

  it('a tilt limit below the optimum stops at the limit, facing the sun: tilt 0…15° → tilt 15°, azimuth 180°', () => {
    const b = bestReachableOrientationWith(closedForm, { tiltRangeDeg: [0, 15], azimuthRangeDeg: [0, 360] }, { resolutionDeg: 0.5 });
    expect(b.tiltDeg).toBe(15);
    expect(b.azimuthDeg).toBe(180);
    expect(b.wm2).toBeCloseTo(closedForm(normalFromTiltAzimuth(15, 180)), 12);
  });

  it('an azimuth limit away from the sun stops at the nearer azimuth limit: 60…150° → 150°, and the result is the best of a fine brute grid', () => {
    const limits: UnitLimits = { tiltRangeDeg: [0, 85], azimuthRangeDeg: [60, 150] };
    const b = bestReachableOrientationWith(closedForm, limits, { resolutionDeg: 0.5 });
    expect(b.azimuthDeg).toBe(150);
    let brute = -Infinity;
    for (let t = 0; t <= 85; t += 0.5)
      for (let a = 60; a <= 150; a += 0.5) brute = Math.max(brute, closedForm(normalFromTiltAzimuth(t, a)));
    expect(b.wm2).toBeCloseTo(brute, 9);
  });

  it('two lobes: the brighter one wins, as on a 0.5° brute grid (low lamps at azimuth 0° and 180°, 100 and 104 W/m²)', () => {
    const lamp = (az: number, el: number, wm2: number) => {
      const d = directionFromAzimuthElevation(az, el);
      return (n: Vec3) => wm2 * Math.max(0, dot(n, d));
    };
    const a = lamp(0, 10, 100);
    const c = lamp(180, 10, 104);
    const e = (n: Vec3) => a(n) + c(n);
    const b = bestReachableOrientationWith(e, STANDARD_UNIT_LIMITS, { resolutionDeg: 0.5 });
    let brute = { wm2: -Infinity, tiltDeg: 0, azimuthDeg: 0 };
    for (let t = 0; t <= 85; t += 0.5)
      for (let az = 0; az < 360; az += 0.5) {
        const x = e(normalFromTiltAzimuth(t, az));
        if (x > brute.wm2) brute = { wm2: x, tiltDeg: t, azimuthDeg: az };
      }
    expect(brute.azimuthDeg).toBe(180);
    expect(b.azimuthDeg).toBe(180);
    expect(b.tiltDeg).toBe(brute.tiltDeg);
    expect(b.wm2).toBeCloseTo(brute.wm2, 9);
  });

  it('rejects bad limits and options with a message naming them', () => {
    expect(() => bestReachableOrientationWith(closedForm, { tiltRangeDeg: [50, 10], azimuthRangeDeg: [0, 360] })).toThrow(/tiltRangeDeg/);
    expect(() => bestReachableOrientationWith(closedForm, { tiltRangeDeg: [0, 85], azimuthRangeDeg: [0, 400] })).toThrow(/azimuthRangeDeg/);
    expect(() => bestReachableOrientationWith(closedForm, ANY, { resolutionDeg: 0 })).toThrow(/resolutionDeg/);
    expect(() => bestReachableOrientationWith(closedForm, ANY, { resolutionDeg: 2, coarseStepDeg: 1 })).toThrow(/coarseStepDeg/);
  });
});
