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

  it('does not take a station shaded by the surveyed horizon for a sky without beam: under a clear sky the beam comes from the clear-sky model', () => {
    // A wall to the south-east, 60° high: at 05:30 UTC on midsummer day the sun (east-north-east, about 19° up) is behind it, so the
    // station reads the diffuse sky only (GHI ≈ DHI ≈ the clear-sky diffuse).
    const walled = {
      ...open,
      horizon: [
        [60, 0],
        [60, 60],
        [150, 60],
        [150, 0],
      ] as [number, number][],
    };
    const t = Date.parse('2026-06-21T05:30:00Z');
    const clear = siteSky(site, walled, t, null);
    expect(clear.input.sun!.elevationDeg).toBeGreaterThan(15);
    const shadedReading = { ghiWm2: clear.input.dhiWm2!, dhiWm2: clear.input.dhiWm2! };
    const shaded = siteSky(site, walled, t, shadedReading);
    // The beam the clear-sky model gives (Ineichen & Perez 2002), not the zero a GHI equal to DHI would imply.
    expect(shaded.input.sun!.dniWm2).toBeCloseTo(clear.input.sun!.dniWm2!, 6);
    expect(shaded.input.dhiWm2).toBeCloseTo(shadedReading.dhiWm2, 6);
    // Under an overcast sky (diffuse far above the clear-sky diffuse) a shaded station still means no beam.
    const overcast = siteSky(site, walled, t, { ghiWm2: 4 * clear.input.dhiWm2!, dhiWm2: 4 * clear.input.dhiWm2! });
    expect(overcast.input.sun!.dniWm2 ?? 0).toBe(0);
    // A station in sun keeps its own beam.
    const sunlit = siteSky(site, open, t, { ghiWm2: 300, dhiWm2: 100 });
    expect(sunlit.input.ghiWm2).toBeCloseTo(300, 6);
  });

  it("reads a station lit by a facade's image of the sun as beam plus image, not as a stronger beam", () => {
    // A glazed wall across the north half of the sky facing south: at noon the sun's image (about 0°, 65° up) lights the
    // station from above as well. The station's GHI is then the beam, the image (ρ·DNI on the horizontal) and the diffuse.
    const glazed = {
      ...open,
      reflectors: [
        {
          normalAzimuthDeg: 180,
          normalElevationDeg: 0,
          azimuthFromDeg: 270,
          azimuthToDeg: 90,
          elevationFromDeg: 0,
          elevationToDeg: 80,
          reflectance: 0.4,
        },
      ],
    };
    const clear = siteSky(site, glazed, noon, null);
    const sharp = clear.sky.pointSources.reduce((g, p) => g + p.irradianceWm2 * Math.max(0, p.direction[2]), 0);
    expect(clear.sky.pointSources.map((p) => p.kind)).toEqual(['sun', 'sun-image']);
    const reading = { ghiWm2: sharp + clear.input.dhiWm2!, dhiWm2: clear.input.dhiWm2! };
    const modelled = siteSky(site, glazed, noon, reading);
    // Derived from the sky's composition (shared/README.md "Sky model"): GHI − DHI = DNI·(cos Z + ρ·sin e_image).
    expect(modelled.input.sun!.dniWm2).toBeCloseTo(clear.input.sun!.dniWm2!, 6);
  });
});
