/**
 * Urban canyon / courtyard: a clear day seen from the floor of a courtyard ringed by school buildings and tree crowns.
 * The horizon profile (azimuth, elevation) puts the sun behind obstructions for part of the day, so units go looking for
 * the brightest open sky or a gap. Geometry from the demo world's survey (shared/demo-world).
 */
import { COURTYARD_HORIZON, type HorizonPoints } from '../../shared/demo-world';
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { CALM } from './weather';

export function urbanCanyon(site: SiteInfo, horizon: HorizonPoints = COURTYARD_HORIZON): SkyParts {
  return {
    shape: (clear, sun) => outdoorSky(sun, clear.dniWm2, clear.dhiWm2, 12, site.albedo, { horizon }),
    wind: { ...CALM, meanMs: 2 },
    airTemp: { meanC: 17, amplitudeC: 6 },
  };
}
