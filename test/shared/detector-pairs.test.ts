import { describe, expect, it } from 'vitest';
import { analyseLandscape, ascentTrajectory, buildSky, detectorReadings, irradianceAt } from '../../shared/landscape/index';
import { detectorNormals, motionAxes } from '../../shared/landscape/detector-pairs';
import { angleBetweenDeg } from '../../shared/sphere/directions';

const RAD = Math.PI / 180;

// Photodifferential identities (physics.md §8, derived from Lambert's cosine law [SC]):
// P = E(α+δ) − E(α−δ); beam only P = −2·DNI·sin α·sin δ; isotropic sky P = −D·sin β·sin δ; ground adds +ρG·sin β·sin δ.
describe('detector pairs and photodifferentials', () => {
  it('beam only: DNI 900, 5° past the sun, δ = 30° → −78.4402 W/m²', () => {
    const sky = buildSky({ sun: { azimuthDeg: 180, elevationDeg: 40, dniWm2: 900 }, dhiWm2: 0, albedo: 0 });
    const r = detectorReadings(sky, 55, 180, 30); // sun at tilt 50°, panel at 55°: α = 5°
    expect(Math.abs(r.tiltDifferentialWm2 - -78.4402)).toBeLessThan(1e-4);
    expect(Math.abs(r.tiltDifferentialWm2 - -2 * 900 * Math.sin(5 * RAD) * Math.sin(30 * RAD))).toBeLessThan(1e-9);
    expect(Math.abs(r.azimuthDifferentialWm2)).toBeLessThan(1e-9); // facing the sun's azimuth: sideways pair balanced
    const east = detectorReadings(sky, 50, 170, 10); // sun lies toward increasing azimuth
    expect(east.azimuthDifferentialWm2).toBeGreaterThan(0);
  });

  it('detector normals: each detector δ from the panel, tilt pair n cos δ ± t sin δ, azimuth pair n cos δ ± u sin δ', () => {
    for (const [tilt, az, d] of [
      [30, 200, 20],
      [5, 10, 8],
      [80, 355, 15],
      [0, 90, 20],
    ] as const) {
      const n = detectorNormals(tilt, az, d);
      const { n: p, t, u } = motionAxes(tilt, az);
      const c = Math.cos(d * RAD);
      const s = Math.sin(d * RAD);
      for (const k of [0, 1, 2]) {
        expect(Math.abs(n.tiltPlus[k]! - (p[k]! * c + t[k]! * s))).toBeLessThan(1e-12);
        expect(Math.abs(n.tiltMinus[k]! - (p[k]! * c - t[k]! * s))).toBeLessThan(1e-12);
        expect(Math.abs(n.azimuthPlus[k]! - (p[k]! * c + u[k]! * s))).toBeLessThan(1e-12);
      }
      for (const v of [n.tiltPlus, n.tiltMinus, n.azimuthPlus, n.azimuthMinus]) expect(angleBetweenDeg(v, n.panel)).toBeCloseTo(d, 9);
    }
  });

  it('isotropic sky: D 300, β 30°, δ 20° → −51.3030 W/m² (fast and brute)', () => {
    const sky = buildSky({ sun: null, dhiWm2: 300, albedo: 0 });
    expect(Math.abs(detectorReadings(sky, 30, 200, 20).tiltDifferentialWm2 - -51.303)).toBeLessThan(0.01);
    expect(Math.abs(detectorReadings(sky, 30, 200, 20, 'brute').tiltDifferentialWm2 - -51.303)).toBeLessThan(0.05);
  });

  it('ground reflection adds +ρG·sin β·sin δ', () => {
    const sky = buildSky({ sun: null, dhiWm2: 300, ghiWm2: 350, albedo: 0.2 });
    const expected = -300 * Math.sin(30 * RAD) * Math.sin(20 * RAD) + 0.2 * 350 * Math.sin(30 * RAD) * Math.sin(20 * RAD);
    expect(Math.abs(detectorReadings(sky, 30, 10, 20).tiltDifferentialWm2 - expected)).toBeLessThan(0.01);
  });

  // Closed-form optimum with beam + isotropic sky + ground (physics.md §8 [SC], checked there by brute force):
  // n* ∝ DNI·s + ½(D − ρG)·ẑ, E_max = |v| + (D + ρG)/2. DNI 100, sun elevation 30°, D 300, ρ 0.2, G 350.
  const optimumSky = buildSky({ sun: { azimuthDeg: 180, elevationDeg: 30, dniWm2: 100 }, dhiWm2: 300, ghiWm2: 350, albedo: 0.2 });
  it('closed-form optimum: normal elevation 62.307°, 371.347 W/m²; sun-pointing 342.5, horizontal 350', () => {
    for (const method of ['fast', 'brute'] as const) {
      expect(Math.abs(irradianceAt(optimumSky, 90 - 62.307, 180, method) - 371.347)).toBeLessThan(0.05);
      expect(Math.abs(irradianceAt(optimumSky, 60, 180, method) - 342.5)).toBeLessThan(0.05);
      expect(Math.abs(irradianceAt(optimumSky, 0, 0, method) - 350)).toBeLessThan(0.05);
    }
    const report = analyseLandscape(optimumSky, { stepDeg: 1, maxDetectorTiltDeg: 2 });
    expect(Math.abs(report.globalMax.tiltDeg - (90 - 62.307))).toBeLessThanOrEqual(0.5);
    expect(report.globalMax.azimuthDeg).toBe(180);
    expect(Math.abs(report.globalMax.wm2 - 371.347)).toBeLessThan(0.1);
    expect(report.localMaxima).toHaveLength(1);
  });

  it('a unit climbing its differentials reaches that optimum', () => {
    const { points, converged } = ascentTrajectory(
      optimumSky,
      { tiltDeg: 70, azimuthDeg: 110 },
      { detectorTiltDeg: 5, gainDegPerWm2: 0.5, deadbandWm2: 0.05 },
    );
    expect(converged).toBe(true);
    const end = points[points.length - 1]!;
    expect(Math.abs(end.tiltDeg - (90 - 62.307))).toBeLessThan(1);
    expect(Math.abs(end.azimuthDeg - 180)).toBeLessThan(2);
    expect(end.wm2).toBeGreaterThan(371.347 - 0.2);
    for (let k = 1; k < points.length; k++) expect(points[k]!.wm2).toBeGreaterThan(points[k - 1]!.wm2 - 0.5); // ascent
  });

  it('rejects a detector tilt outside 0…45°', () => {
    expect(() => detectorReadings(optimumSky, 10, 10, 50)).toThrow(/detectorTiltDeg: .*\[0, 45\]/);
    expect(() => detectorReadings(optimumSky, 10, 10, Number.NaN)).toThrow(/detectorTiltDeg/);
  });
});
