/**
 * Full overcast: no beam; the dome follows the traditional CIE overcast sky (brightest at the zenith, a third of it at the
 * horizon); diffuse horizontal about a quarter of the clear-sky global (clearness index ≈ 0.2, all diffuse).
 */
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { CALM } from './weather';

export const OVERCAST_FRACTION_OF_CLEAR_GHI = 0.25;

export function overcast(site: SiteInfo): SkyParts {
  return {
    shape: (clear, sun) => outdoorSky(sun, 0, clear.ghiWm2 * OVERCAST_FRACTION_OF_CLEAR_GHI, 'moon-spencer', site.albedo),
    wind: { ...CALM, meanMs: 5 },
    airTemp: { meanC: 11, amplitudeC: 2 },
  };
}
