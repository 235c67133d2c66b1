import { describe, expect, it } from 'vitest';
import { DEFAULT_HEALTH_SETTINGS } from '../../server/health/health-settings';
import { HealthEngine } from '../../server/health/health-engine';
import { globalMaxOf, siteModelOf, siteSky, type SkySite } from '../../server/health/site-sky';

// A site at 48° N with an open horizon; inputs only, no database.
const site: SkySite = { latitudeDeg: 48, longitudeDeg: 11, elevationM: 500, albedo: 0.2 };
const open = { skyType: 'isotropic' as const, horizon: [], reflectors: [], lamps: [] };
const noon = Date.parse('2026-06-21T11:00:00Z');

describe('site sky and site model from inputs alone', () => {
  it('takes its magnitudes from the station reading when given one, else from the clear-sky model', () => {
    const clear = siteSky(site, open, noon, null);
    const cloudy = siteSky(site, open, noon, { ghiWm2: 300, dhiWm2: 280 });
    expect(cloudy.input.ghiWm2).toBeCloseTo(300, 6);
    expect(cloudy.input.dhiWm2).toBeCloseTo(280, 6);
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
