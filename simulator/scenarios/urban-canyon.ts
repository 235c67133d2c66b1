/**
 * Urban canyon / courtyard: a clear day seen from the floor of a courtyard ringed by school buildings and tree crowns.
 * The horizon profile (azimuth, elevation) puts the sun behind obstructions for part of the day, so units go looking for
 * the brightest open sky or a gap. Invented survey, demo and checks only.
 */
import { outdoorSky, type HorizonPoints } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { CALM } from './weather';

export const COURTYARD_HORIZON: HorizonPoints = [
  [0, 22], [40, 22], [40, 14], [75, 16], [95, 30], [120, 34], [135, 12], [150, 12], [165, 28], [200, 28],
  [200, 10], [230, 12], [250, 26], [280, 32], [300, 20], [330, 20], [330, 22],
];

export function urbanCanyon(site: SiteInfo, horizon: HorizonPoints = COURTYARD_HORIZON): SkyParts {
  return {
    shape: (clear, sun) => outdoorSky(sun, clear.dniWm2, clear.dhiWm2, 12, site.albedo, { horizon }),
    wind: { ...CALM, meanMs: 2 },
    airTemp: { meanC: 17, amplitudeC: 6 },
  };
}
