/** Clear day, open site: clear-sky beam and diffuse, CIE standard clear sky (type 12), flat horizon. */
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { CALM } from './weather';

export function clearDay(site: SiteInfo): SkyParts {
  return {
    shape: (clear, sun) => outdoorSky(sun, clear.dniWm2, clear.dhiWm2, 12, site.albedo),
    wind: CALM,
    airTemp: { meanC: 18, amplitudeC: 6 },
  };
}
