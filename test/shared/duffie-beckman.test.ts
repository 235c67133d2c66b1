import { describe, expect, it } from 'vitest';
import { buildSky, computeLandscape, irradianceAt } from '../../shared/landscape/index';
import { declinationCooperDeg, equationOfTimeSpencerMin, horizonCoordinates, incidenceAngleDeg } from '../../shared/solar-position/index';

// J. A. Duffie and W. A. Beckman, Solar Engineering of Thermal Processes, 4th ed. (2013): worked examples.
// Sun geometry from latitude, declination and hour angle goes through SPA's horizon-coordinate step
// (Reda & Andreas 2008 eqs. 41–46); D&B azimuths are from south (east negative), ours from north.

/** Zenith and azimuth (from north) of the sun for latitude φ, declination δ and hour angle ω (D&B inputs). */
function sunFrom(latDeg: number, declDeg: number, hourAngleDeg: number) {
  const h = horizonCoordinates(latDeg, declDeg, hourAngleDeg);
  const fromSouth = h.astronomersAzimuthDeg > 180 ? h.astronomersAzimuthDeg - 360 : h.astronomersAzimuthDeg;
  return { zenithDeg: 90 - h.elevationDeg, azimuthDeg: (h.astronomersAzimuthDeg + 180) % 360, fromSouthDeg: fromSouth };
}

describe('Duffie & Beckman worked examples', () => {
  it('Table 1.6.1: declination of the average days (Cooper 1969)', () => {
    const days = [17, 47, 75, 105, 135, 162, 198, 228, 258, 288, 318, 344];
    const table = [-20.9, -13.0, -2.4, 9.4, 18.8, 23.1, 21.2, 13.5, 2.2, -9.6, -18.9, -23.0]; // D&B Table 1.6.1
    days.forEach((n, i) => expect(Math.abs(declinationCooperDeg(n) - table[i]!)).toBeLessThanOrEqual(0.06));
  });

  it('Example 1.5.1: equation of time on 3 February is −13.5 min; solar time 10:19 at Madison', () => {
    const e = equationOfTimeSpencerMin(34);
    expect(Math.abs(e - -13.5)).toBeLessThanOrEqual(0.1); // D&B Ex 1.5.1
    const solarMinutes = 10 * 60 + 30 + 4 * (90 - 89.4) + e; // D&B eq. 1.5.2
    expect(Math.round(solarMinutes)).toBe(10 * 60 + 19); // D&B Ex 1.5.1: 10:19
  });

  it('Example 1.6.1: incidence on a 45° plane turned 15° west of south', () => {
    const s = sunFrom(43, -14, -22.5);
    const theta = incidenceAngleDeg(s.zenithDeg, s.azimuthDeg, 45, 180 + 15);
    expect(Math.abs(Math.cos((theta * Math.PI) / 180) - 0.817)).toBeLessThanOrEqual(0.001); // D&B Ex 1.6.1
    expect(Math.abs(theta - 35)).toBeLessThanOrEqual(0.2); // D&B Ex 1.6.1
  });

  it('Example 1.6.2: zenith and azimuth at 9:30 on 13 February and 18:30 on 1 July, φ = 43°', () => {
    const a = sunFrom(43, -14, -37.5);
    expect(Math.abs(a.zenithDeg - 66.5)).toBeLessThanOrEqual(0.05); // D&B Ex 1.6.2a
    expect(Math.abs(a.fromSouthDeg - -40.0)).toBeLessThanOrEqual(0.1); // D&B Ex 1.6.2a
    const b = sunFrom(43, 23.1, 97.5);
    expect(Math.abs(b.zenithDeg - 79.6)).toBeLessThanOrEqual(0.05); // D&B Ex 1.6.2b
    expect(Math.abs(b.fromSouthDeg - 112.0)).toBeLessThanOrEqual(0.05); // D&B Ex 1.6.2b
  });

  it('Example 1.8.1: beam ratio Rb = cos θ / cos θz = 1.66', () => {
    const s = sunFrom(43, -14, -22.5);
    const cosZ = Math.cos((s.zenithDeg * Math.PI) / 180);
    const cosT = Math.cos((incidenceAngleDeg(s.zenithDeg, s.azimuthDeg, 45, 195) * Math.PI) / 180);
    expect(Math.abs(cosZ - 0.491)).toBeLessThanOrEqual(0.001); // D&B Ex 1.8.1
    expect(Math.abs(cosT / cosZ - 1.66)).toBeLessThanOrEqual(0.01); // D&B Ex 1.8.1
  });

  it('Example 2.15.1: isotropic transposition gives IT = 1.17 MJ/m² on a 60° south plane (landscape, both methods)', () => {
    const decl = declinationCooperDeg(51);
    const s = sunFrom(40, decl, -37.5);
    expect(Math.abs(s.zenithDeg - 62.2)).toBeLessThanOrEqual(0.05); // published secondary test of D&B Ex 2.15.1: θz 62.20
    const theta = incidenceAngleDeg(s.zenithDeg, s.azimuthDeg, 60, 180);
    expect(Math.abs(theta - 36.97)).toBeLessThanOrEqual(0.05); // same: θ 36.97
    // hourly totals in kJ/m² used as proportional "W/m²": I = 1040, Id = 796, Ib = 244 (D&B Ex 2.15.1)
    const cosZ = Math.cos((s.zenithDeg * Math.PI) / 180);
    const sky = buildSky({
      sun: { azimuthDeg: s.azimuthDeg, elevationDeg: 90 - s.zenithDeg, dniWm2: 244 / cosZ },
      dhiWm2: 796,
      ghiWm2: 1040,
      skyType: 'isotropic',
      albedo: 0.6,
    });
    const fast = irradianceAt(sky, 60, 180);
    const brute = irradianceAt(sky, 60, 180, 'brute');
    expect(Math.abs(fast - 1170)).toBeLessThanOrEqual(10); // D&B Ex 2.15.1: 1.17 MJ/m² (0.418 + 0.597 + 0.156)
    expect(Math.abs(brute - 1170)).toBeLessThanOrEqual(10);
    // D&B eq. 2.15.1 (Liu–Jordan isotropic) evaluated exactly: GT = Gb·Rb + Gd(1+cosβ)/2 + Gρ(1−cosβ)/2
    const exact = 244 * (Math.cos((theta * Math.PI) / 180) / cosZ) + 796 * 0.75 + 1040 * 0.6 * 0.25;
    expect(Math.abs(fast - exact) / exact).toBeLessThan(1e-3);
    expect(Math.abs(brute - exact) / exact).toBeLessThan(1e-3);
  });

  it('isotropic identities: horizontal E = π·L, tilted E = π·L(1 + cos β)/2 (no ground), fast and brute', () => {
    const sky = buildSky({ sun: null, dhiWm2: 300, skyType: 'isotropic', albedo: 0 });
    expect(Math.abs(sky.zenithRadianceWm2Sr * Math.PI - 300)).toBeLessThan(1e-9); // D&B eq. 2.15.1 with Gb = 0: horizontal = π·L
    const land = computeLandscape(sky, { stepDeg: 10, tiltRangeDeg: [0, 180] });
    const brute = computeLandscape(sky, { stepDeg: 10, tiltRangeDeg: [0, 180], method: 'brute' });
    const nA = land.azimuthsDeg.length;
    land.tiltsDeg.forEach((b, i) => {
      const expected = 300 * ((1 + Math.cos((b * Math.PI) / 180)) / 2);
      for (let j = 0; j < nA; j += 5) {
        expect(Math.abs(land.values[i * nA + j]! - expected)).toBeLessThan(0.05);
        expect(Math.abs(brute.values[i * nA + j]! - expected)).toBeLessThan(0.05);
      }
    });
  });
});
