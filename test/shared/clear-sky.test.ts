import { describe, expect, it } from 'vitest';
import { clearSkyGhiHaurwitz, clearSkyIneichenPerez, erbsDiffuseFraction, erbsSplit } from '../../shared/clear-sky/index';

describe('Ineichen & Perez 2002 clear sky', () => {
  it('Z = 10°, AM = 1, TL = 3, h = 0, I0 = 1364 W/m²', () => {
    const r = clearSkyIneichenPerez({
      apparentZenithDeg: 10,
      absoluteAirMass: 1,
      linkeTurbidity: 3,
      altitudeM: 0,
      extraterrestrialNormalWm2: 1364,
    });
    // pvlib-python test values (published copy) reproducing Ineichen & Perez 2002 — physics.md §6 [CS]
    expect(Math.abs(r.ghiWm2 - 1038.159219)).toBeLessThan(1e-6);
    expect(Math.abs(r.dniWm2 - 942.208186)).toBeLessThan(1e-6);
    expect(Math.abs(r.dhiWm2 - 110.265293)).toBeLessThan(1e-6);
  });

  it('with the exp(0.01·AM^1.8) enhancement factor', () => {
    const r = clearSkyIneichenPerez({
      apparentZenithDeg: 10,
      absoluteAirMass: 1,
      linkeTurbidity: 3,
      altitudeM: 0,
      extraterrestrialNormalWm2: 1364,
      perezEnhancement: true,
    });
    expect(Math.abs(r.ghiWm2 - 1048.592893)).toBeLessThan(1e-6); // physics.md §6 [CS]
    expect(Math.abs(r.dhiWm2 - 120.698967)).toBeLessThan(1e-6); // physics.md §6 [CS]
  });

  it('altitude raises the clear-sky irradiance and the sun below the horizon gives zero', () => {
    const args = { apparentZenithDeg: 30, absoluteAirMass: 1.15, linkeTurbidity: 3, extraterrestrialNormalWm2: 1361 };
    expect(clearSkyIneichenPerez({ ...args, altitudeM: 2000 }).ghiWm2).toBeGreaterThan(
      clearSkyIneichenPerez({ ...args, altitudeM: 0 }).ghiWm2,
    );
    expect(clearSkyIneichenPerez({ ...args, apparentZenithDeg: 95, absoluteAirMass: Infinity, altitudeM: 0 })).toEqual({
      ghiWm2: 0,
      dniWm2: 0,
      dhiWm2: 0,
    });
  });
});

describe('Haurwitz 1945 clear sky (constants 1098, 0.059 as in Reno et al., SAND2012-2389)', () => {
  it('elevation 30° and 90°', () => {
    expect(Math.abs(clearSkyGhiHaurwitz(60) - 487.894132885)).toBeLessThan(1e-6); // pvlib published test, physics.md §6 [CS]
    expect(Math.abs(clearSkyGhiHaurwitz(0) - 1035.092032535)).toBeLessThan(1e-6); // pvlib published test, physics.md §6 [CS]
    expect(clearSkyGhiHaurwitz(91)).toBe(0);
  });
});

describe('Erbs, Klein & Duffie 1982 diffuse fraction', () => {
  it('kt = 0.1, 0.5, 0.8 and the step above 0.8', () => {
    // derived from the Erbs et al. 1982 correlation (physics.md §6 [SC])
    expect(Math.abs(erbsDiffuseFraction(0.1) - 0.991)).toBeLessThan(1e-9);
    expect(Math.abs(erbsDiffuseFraction(0.5) - 0.65915)).toBeLessThan(1e-6);
    expect(Math.abs(erbsDiffuseFraction(0.8) - 0.16527)).toBeLessThan(1e-6);
    expect(erbsDiffuseFraction(0.81)).toBe(0.165);
    expect(erbsDiffuseFraction(0.2)).toBeGreaterThanOrEqual(0.98); // physics.md §8: kt < 0.22 → diffuse fraction ≥ 0.98 [SC]
  });

  it('the split conserves GHI = DHI + DNI·cos Z', () => {
    const s = erbsSplit(600, 40, 1361);
    expect(Math.abs(s.dhiWm2 + s.dniWm2 * Math.cos((40 * Math.PI) / 180) - 600)).toBeLessThan(1e-9);
    expect(s.kt).toBeCloseTo(600 / (1361 * Math.cos((40 * Math.PI) / 180)), 12);
  });
});
