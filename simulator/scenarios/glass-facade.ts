/**
 * Roof between glass towers: a city horizon with a tower block to the south-east that hides the morning sun, and two
 * glazed facades that mirror it: one to the west facing east (the morning image outshines the hidden sun) and one to the
 * north facing south (a midday image about 100–110° from the sun, a second lobe where units with narrow detector tilt
 * get trapped). Geometry from the demo world's survey (shared/demo-world).
 */
import { CITY_HORIZON, FACADES, type HorizonPoints } from '../../shared/demo-world';
import type { ReflectorInput } from '../../shared/sky-radiance';
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { BREEZY } from './weather';

export function glassFacade(site: SiteInfo, opts: { horizon?: HorizonPoints; reflectors?: readonly ReflectorInput[] } = {}): SkyParts {
  const horizon = opts.horizon ?? CITY_HORIZON;
  const reflectors = opts.reflectors ?? FACADES;
  return {
    shape: (clear, sun) => outdoorSky(sun, clear.dniWm2, clear.dhiWm2, 12, site.albedo, { horizon, reflectors }),
    wind: { ...BREEZY, episodesPerDay: 0.5 },
    airTemp: { meanC: 14, amplitudeC: 5 },
  };
}
