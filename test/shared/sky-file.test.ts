import { describe, expect, it } from 'vitest';
import { parseSkyFile, skyFromFile } from '../../shared/sky-file/index';
import { clearSkyIneichenPerez, erbsSplit } from '../../shared/clear-sky/index';

const site = { latitudeDeg: 39.742476, longitudeDeg: -105.1786, elevationM: 1830.14 };
const time = '2003-10-17T12:30:30-07:00';

describe('sky file validation (messages name the field and the allowed range)', () => {
  const bad: [unknown, RegExp][] = [
    [{ site: { ...site, latitudeDeg: 91 }, time }, /site\.latitudeDeg: must be in \[-90, 90\]/],
    [{ site, time: '2003-10-17T12:30:30' }, /time: must be an ISO 8601 instant with an offset/],
    [
      { sun: { azimuthDeg: 10, elevationDeg: 30, dniWm2: 100 }, skyType: 16 },
      /skyType: must be "isotropic", "moon-spencer" or an integer .*1…15/,
    ],
    [{ skyType: 'cloudy' }, /skyType/],
    [
      {
        horizon: [
          [10, 5],
          [5, 5],
        ],
      },
      /horizon\[1\]\[0\]: must be sorted by azimuth/,
    ],
    [{ horizon: [[10, 95]] }, /horizon\[0\]\[1\]: must be in \[0, 90\]/],
    [
      { reflectors: [{ normalAzimuthDeg: 1, azimuthFromDeg: 0, azimuthToDeg: 5, elevationFromDeg: 0, elevationToDeg: 5, reflectance: 2 }] },
      /reflectors\[0\]\.reflectance: must be in \[0, 1\]/,
    ],
    [{ lamps: [{ azimuthDeg: 0, elevationDeg: 60 }] }, /lamps\[0\]\.irradianceWm2/],
    [{ albedo: -0.1 }, /albedo: must be in \[0, 1\]/],
    [{ ghiWm2: 100, dhiWm2: 200 }, /dhiWm2: must not exceed ghiWm2/],
    [{ site }, /time: required with "site"/],
    [{ colour: 'blue' }, /colour: unknown field/],
    [{ dhiWm2: Number.NaN }, /dhiWm2: must be a finite number/],
    [{ dhiWm2: Number.POSITIVE_INFINITY }, /dhiWm2/],
  ];
  for (const [value, message] of bad) {
    it(`rejects ${JSON.stringify(value)}`, () => expect(() => parseSkyFile(value)).toThrow(message));
  }
});

describe('sky magnitudes from the sky file', () => {
  it('site + time: sun from SPA (worked-example position), clear sky when nothing is measured', () => {
    const r = skyFromFile({ site, time, pressureHpa: 820, temperatureC: 11, deltaTS: 67 });
    expect(r.sunSource).toBe('SPA');
    expect(Math.abs(r.input.sun!.elevationDeg - 39.888378)).toBeLessThan(1e-5); // Reda & Andreas 2008 Table A5.1
    expect(Math.abs(r.input.sun!.azimuthDeg - 194.340241)).toBeLessThan(1e-5); // Table A5.1
    expect(r.magnitudeSource).toMatch(/Ineichen–Perez clear sky/);
    expect(r.input.sun!.dniWm2).toBeGreaterThan(700);
  });

  it('measured GHI only: Erbs split; GHI and DHI: DNI by closure', () => {
    const erbs = skyFromFile({ site, time, ghiWm2: 500, deltaTS: 67 });
    expect(erbs.magnitudeSource).toMatch(/Erbs/);
    const z = 90 - erbs.input.sun!.elevationDeg;
    expect(Math.abs(erbs.input.dhiWm2 + erbs.input.sun!.dniWm2 * Math.cos((z * Math.PI) / 180) - 500)).toBeLessThan(1e-6);
    const expected = erbsSplit(500, z, 1361 * (1 + 0.033 * Math.cos((2 * Math.PI * 290) / 365)));
    expect(erbs.input.dhiWm2).toBeCloseTo(expected.dhiWm2, 6);
    const both = skyFromFile({ site, time, ghiWm2: 500, dhiWm2: 200, deltaTS: 67 });
    expect(both.input.sun!.dniWm2).toBeCloseTo(300 / Math.cos((z * Math.PI) / 180), 3);
  });

  it('explicit sun overrides site and time; DHI from GHI − DNI·cos Z', () => {
    const r = skyFromFile({ site, time, sun: { azimuthDeg: 180, elevationDeg: 30, dniWm2: 600 }, ghiWm2: 450 });
    expect(r.sunSource).toBe('sky file');
    expect(r.input.sun!.azimuthDeg).toBe(180);
    expect(r.input.dhiWm2).toBeCloseTo(150, 9);
  });

  it('DHI only: DNI from the Ineichen–Perez clear sky at the site altitude', () => {
    const r = skyFromFile({ sun: { azimuthDeg: 180, elevationDeg: 60 }, dhiWm2: 80, linkeTurbidity: 4 });
    const z = 30;
    const am = 1 / (Math.cos((z * Math.PI) / 180) + 0.50572 * Math.pow(96.07995 - z, -1.6364)); // Kasten & Young 1989
    const clear = clearSkyIneichenPerez({
      apparentZenithDeg: z,
      absoluteAirMass: am,
      linkeTurbidity: 4,
      altitudeM: 0,
      extraterrestrialNormalWm2: 1361,
    });
    expect(r.input.sun!.dniWm2).toBeCloseTo(clear.dniWm2, 9);
    expect(r.input.dhiWm2).toBe(80);
  });

  it('no sun, no site: an indoor sky with lamps only', () => {
    const r = skyFromFile({ lamps: [{ azimuthDeg: 0, elevationDeg: 60, irradianceWm2: 40 }] });
    expect(r.sky.sunDirection).toBeNull();
    expect(r.sky.dhiWm2).toBe(0);
    expect(r.sky.pointSources).toHaveLength(1);
  });
});
