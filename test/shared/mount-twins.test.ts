import { describe, expect, it } from 'vitest';
import { buildSky } from '../../shared/landscape';
import { fixedTwinOrientation, sunTwinOrientation, TwinModel } from '../../shared/pv-performance/mount-twins';

const rad = Math.PI / 180;
/** Isotropic (Liu–Jordan) transposition, Duffie & Beckman eq. 2.15.1: GT = Gb·Rb + Gd(1 + cos β)/2 + G·ρ(1 − cos β)/2. */
function liuJordan(dni: number, cosIncidence: number, dhi: number, ghi: number, albedo: number, tiltDeg: number): number {
  const c = Math.cos(tiltDeg * rad);
  return dni * Math.max(0, cosIncidence) + (dhi * (1 + c)) / 2 + (ghi * albedo * (1 - c)) / 2;
}
/** cos θ between a plane (tilt, azimuth) and the sun (elevation, azimuth), physics.md §7: cosβ cosZ + sinβ sinZ cos(Azs − Azt). */
const cosInc = (tiltDeg: number, azDeg: number, sunElevDeg: number, sunAzDeg: number) =>
  Math.cos(tiltDeg * rad) * Math.sin(sunElevDeg * rad) +
  Math.sin(tiltDeg * rad) * Math.cos(sunElevDeg * rad) * Math.cos((sunAzDeg - azDeg) * rad);

const limits = { tiltRangeDeg: [0, 85] as const, azimuthRangeDeg: [0, 360] as const };

describe('fixed-tilt and sun-following twins against closed-form isotropic transposition (Liu–Jordan; Duffie & Beckman 2.15.1)', () => {
  it('a clear day: sun at 45° elevation, azimuth 160°, DNI 800, DHI 100, ρ 0.2, latitude 40° N', () => {
    const elev = 45;
    const ghi = 800 * Math.sin(elev * rad) + 100;
    const sky = buildSky({
      sun: { azimuthDeg: 160, elevationDeg: elev, dniWm2: 800 },
      dhiWm2: 100,
      ghiWm2: ghi,
      skyType: 'isotropic',
      albedo: 0.2,
    });
    const v = new TwinModel(sky, 40).of({ tiltDeg: 20, azimuthDeg: 200, limits });
    expect(fixedTwinOrientation(40)).toEqual({ tiltDeg: 40, azimuthDeg: 180 });
    const fixed = liuJordan(800, cosInc(40, 180, elev, 160), 100, ghi, 0.2, 40);
    const sun = liuJordan(800, 1, 100, ghi, 0.2, 90 - elev);
    const unit = liuJordan(800, cosInc(20, 200, elev, 160), 100, ghi, 0.2, 20);
    expect(Math.abs(v.fixedWm2 / fixed - 1)).toBeLessThan(0.005);
    expect(Math.abs(v.sunWm2 / sun - 1)).toBeLessThan(0.005);
    expect(Math.abs(v.unitWm2 / unit - 1)).toBeLessThan(0.005);
    // Best reachable ≥ sun-pointing; closed-form optimum E_max = |v| + (D + ρG)/2, v = DNI·s + ((D − ρG)/2)·up (physics.md §8).
    const s = [Math.cos(elev * rad) * Math.sin(160 * rad), Math.cos(elev * rad) * Math.cos(160 * rad), Math.sin(elev * rad)];
    const vz = 800 * s[2]! + (100 - 0.2 * ghi) / 2;
    const eMax = Math.hypot(800 * s[0]!, 800 * s[1]!, vz) + (100 + 0.2 * ghi) / 2;
    expect(v.bestWm2).toBeGreaterThanOrEqual(v.sunWm2 - 0.5);
    expect(Math.abs(v.bestWm2 / eMax - 1)).toBeLessThan(0.005);
  });

  it('an overcast day: no beam, DHI = GHI = 200, sun at 30°; both twins lose sky by tilting, horizontal is best', () => {
    const sky = buildSky({
      sun: { azimuthDeg: 180, elevationDeg: 30, dniWm2: 0 },
      dhiWm2: 200,
      ghiWm2: 200,
      skyType: 'isotropic',
      albedo: 0.2,
    });
    const v = new TwinModel(sky, 52).of({ tiltDeg: 0, azimuthDeg: 0, limits });
    expect(Math.abs(v.fixedWm2 / liuJordan(0, 0, 200, 200, 0.2, 52) - 1)).toBeLessThan(0.005);
    // physics.md §8: pointing at a sun of elevation 30° (tilt 60°) gets 0.800·Eh under the isotropic sky with ρ 0.2.
    expect(Math.abs(v.sunWm2 / (0.8 * 200) - 1)).toBeLessThan(0.005);
    expect(Math.abs(v.bestWm2 - 200)).toBeLessThan(1);
    expect(v.unitWm2).toBeCloseTo(v.bestWm2, 0);
  });

  it('the sun-following twin lies flat at night and keeps within a limited azimuth travel', () => {
    const night = buildSky({ sun: null, dhiWm2: 0 });
    expect(sunTwinOrientation(night, limits)).toEqual({ tiltDeg: 0, azimuthDeg: 180 });
    const sky = buildSky({ sun: { azimuthDeg: 300, elevationDeg: 20, dniWm2: 500 }, dhiWm2: 80, skyType: 'isotropic' });
    expect(sunTwinOrientation(sky, { tiltRangeDeg: [0, 60], azimuthRangeDeg: [90, 270] })).toEqual({ tiltDeg: 60, azimuthDeg: 270 });
    expect(sunTwinOrientation(sky, { tiltRangeDeg: [0, 85], azimuthRangeDeg: [-180, 90] })).toEqual({ tiltDeg: 70, azimuthDeg: -60 });
  });
});
