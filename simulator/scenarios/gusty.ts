/** A clear day with frequent gust episodes above a typical stow limit: units stow themselves and report it. */
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { STORMY } from './weather';

export function gusty(site: SiteInfo): SkyParts {
  return {
    shape: (clear, sun) => outdoorSky(sun, clear.dniWm2, clear.dhiWm2, 12, site.albedo),
    wind: STORMY,
    airTemp: { meanC: 13, amplitudeC: 4 },
  };
}
