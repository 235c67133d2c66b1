import { describe, expect, it } from 'vitest';
import { DEFAULT_HEALTH_SETTINGS } from '../../server/health/health-settings';
import { HealthEngine } from '../../server/health/health-engine';
import { globalMaxOf, siteModelOf, siteSky, type SkySite } from '../../server/health/site-sky';
import { extendedRadiance } from '../../shared/landscape';
import { directionFromAzimuthElevation } from '../../shared/sphere/directions';

// A site at 48° N with an open horizon; inputs only, no database.
const site: SkySite = { latitudeDeg: 48, longitudeDeg: 11, elevationM: 500, albedo: 0.2 };
const open = { skyType: 'isotropic' as const, horizon: [], reflectors: [], lamps: [] };
const noon = Date.parse('2026-06-21T11:00:00Z');

describe('site sky and site model from inputs alone', () => {
  it('takes its magnitudes from the station reading when given one, else from the clear-sky model', () => {
    const clear = siteSky(site, open, noon, null);
    const cloudy = siteSky(site, open, noon, { ghiWm2: 300, dhiWm2: 280 });
    // An open site's station sees the whole dome and the sun: the modelled sky reads what it measured.
    expect(cloudy.input.dhiWm2).toBeCloseTo(280, 6);
    expect(cloudy.input.sun!.dniWm2 * Math.sin((cloudy.input.sun!.elevationDeg * Math.PI) / 180) + cloudy.input.dhiWm2).toBeCloseTo(300, 6);
    expect(clear.input.ghiWm2).toBeGreaterThan(600); // midsummer noon at 48° N, clear sky (from memory: about 850 W/m²)
  });

  it('a summer noon model is daylight for the detectors, a midnight one is not; the global maximum stays below the tilt limit', () => {
    const day = siteModelOf(siteSky(site, open, noon, null), false, noon, 60);
    expect(day.sunElevationDeg).toBeGreaterThan(60);
    expect(day.globalMax.tiltDeg).toBeLessThanOrEqual(60);
    expect(day.globalMax).toEqual(globalMaxOf(siteSky(site, open, noon, null).sky, 60));
    expect(HealthEngine.daylight(day, DEFAULT_HEALTH_SETTINGS)).toBe(true);
    const midnight = Date.parse('2026-06-21T23:00:00Z');
    expect(HealthEngine.daylight(siteModelOf(siteSky(site, open, midnight, null), false, midnight, 60), DEFAULT_HEALTH_SETTINGS)).toBe(
      false,
    );
  });
});

// The station is a horizontal sensor on the site: what it reads as beam (GHI − DHI) is the sun where the survey leaves it
// visible, plus the facades' images of it (derived from Lambert's law: each sharp source adds its normal irradiance times
// the cosine of its zenith angle).
describe('site sky: beam magnitude from a station that sees facades and obstructions', () => {
  const at = Date.parse('2026-05-04T13:30:00Z'); // sun about 44° high in the south-west at 53.5° N
  const roof: SkySite = { latitudeDeg: 53.54, longitudeDeg: 9.99, elevationM: 24, albedo: 0.3 };
  const facade = {
    normalAzimuthDeg: 180,
    normalElevationDeg: 0,
    azimuthFromDeg: 300,
    azimuthToDeg: 60,
    elevationFromDeg: 1,
    elevationToDeg: 60,
    reflectance: 0.3,
  };
  // Horizontal irradiance of the extended radiance by a 1°-cell midpoint rule over the upper hemisphere.
  const diffuseHorizontal = (sky: ReturnType<typeof siteSky>['sky']) => {
    let e = 0;
    for (let el = 0.5; el < 90; el++)
      for (let az = 0.5; az < 360; az++) {
        const d = directionFromAzimuthElevation(az, el);
        e += extendedRadiance(sky, d) * d[2] * Math.cos((el * Math.PI) / 180) * (Math.PI / 180) ** 2;
      }
    return e;
  };
  const sharpHorizontal = (sky: ReturnType<typeof siteSky>['sky']) =>
    sky.pointSources.filter((p) => p.kind !== 'lamp').reduce((s, p) => s + p.irradianceWm2 * Math.max(0, p.direction[2]), 0);

  it('counts the facade image the station sees, so the modelled sun is not brightened by it', () => {
    const withFacade = { skyType: 12 as const, horizon: [], reflectors: [facade], lamps: [] };
    const r = siteSky(roof, withFacade, at, { ghiWm2: 800, dhiWm2: 100 });
    expect(r.sky.pointSources.some((p) => p.kind === 'sun-image')).toBe(true);
    // The modelled station reading reproduces the measured one: sun and image together make GHI − DHI.
    expect(sharpHorizontal(r.sky)).toBeCloseTo(700, 0);
    const open = siteSky(roof, { ...withFacade, reflectors: [] }, at, { ghiWm2: 800, dhiWm2: 100 });
    expect(r.input.sun!.dniWm2).toBeLessThan(0.8 * open.input.sun!.dniWm2);
  });

  it('takes the beam from the clear-sky model when the survey hides the sun and its images from the station', () => {
    const wall = { skyType: 12 as const, horizon: [[0, 50]] as [number, number][], reflectors: [], lamps: [] };
    // What the station behind a 50° wall reads under the clear sky: the dome above the wall and the wall itself.
    const clear = siteSky(roof, wall, at, null);
    const read = diffuseHorizontal(clear.sky);
    const hidden = siteSky(roof, wall, at, { ghiWm2: read, dhiWm2: read });
    expect(hidden.sky.pointSources).toEqual([]);
    expect(hidden.input.sun!.dniWm2).toBeCloseTo(clear.input.sun!.dniWm2, 6);
    // The reading is not the dome's DHI (the wall hides part of the dome and shows the ground's light); the dome that
    // reads so behind the wall is the clear sky's.
    expect(Math.abs(read / clear.input.dhiWm2 - 1)).toBeGreaterThan(0.2);
    expect(hidden.input.dhiWm2 / clear.input.dhiWm2).toBeCloseTo(1, 1);
  });
});

describe('site sky: the dome under cloud', () => {
  it('is uniform when the station reads the light nearly all diffuse (Liu & Jordan 1963), the survey’s usual sky otherwise', () => {
    const usual = { skyType: 12 as const, horizon: [], reflectors: [], lamps: [] };
    expect(siteSky(site, usual, noon, { ghiWm2: 300, dhiWm2: 280 }).input.skyType).toBe('isotropic');
    expect(siteSky(site, usual, noon, { ghiWm2: 800, dhiWm2: 120 }).input.skyType).toBe(12);
    expect(siteSky(site, usual, noon, null).input.skyType).toBe(12);
  });
});
