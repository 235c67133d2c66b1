/**
 * Roof between glass towers: a city horizon with a tower block to the south-east that hides the morning sun, and two
 * glazed facades that mirror it: one to the west facing east (the morning image outshines the hidden sun) and one to the
 * north facing south (a midday image about 100–110° from the sun, a second lobe where units with narrow detector tilt
 * get trapped). Invented survey, demo and checks only.
 */
import type { ReflectorInput } from '../../shared/sky-radiance';
import { outdoorSky, type HorizonPoints } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { BREEZY } from './weather';

export const CITY_HORIZON: HorizonPoints = [
  [0, 6], [40, 8], [45, 24], [100, 24], [100, 46], [165, 46], [170, 9], [230, 9], [300, 12], [350, 6],
];

export const FACADES: readonly ReflectorInput[] = [
  { normalAzimuthDeg: 90, azimuthFromDeg: 200, azimuthToDeg: 300, elevationFromDeg: 1, elevationToDeg: 42, reflectance: 0.4 },
  { normalAzimuthDeg: 180, azimuthFromDeg: 300, azimuthToDeg: 60, elevationFromDeg: 1, elevationToDeg: 45, reflectance: 0.3 },
];

export function glassFacade(site: SiteInfo, opts: { horizon?: HorizonPoints; reflectors?: readonly ReflectorInput[] } = {}): SkyParts {
  const horizon = opts.horizon ?? CITY_HORIZON;
  const reflectors = opts.reflectors ?? FACADES;
  return {
    shape: (clear, sun) => outdoorSky(sun, clear.dniWm2, clear.dhiWm2, 12, site.albedo, { horizon, reflectors }),
    wind: { ...BREEZY, episodesPerDay: 0.5 },
    airTemp: { meanC: 14, amplitudeC: 5 },
  };
}
