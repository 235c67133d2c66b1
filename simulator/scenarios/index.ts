/** The sky scenarios a site can run under, by name. */
import type { Rng } from '../rng';
import { atriumLamps } from './atrium-lamps';
import { brokenCloud } from './broken-cloud';
import { clearDay } from './clear-day';
import { glassFacade } from './glass-facade';
import { gusty } from './gusty';
import { overcast } from './overcast';
import { createSiteWorld, type SiteInfo, type SiteWorld, type SkyParts, type WorldOptions } from './site';
import { urbanCanyon } from './urban-canyon';

export type { SiteInfo, SiteWorld, SiteConditions, WeatherNow } from './site';
export { frozenWorld } from './site';

export const SCENARIOS: Record<string, { description: string; parts: (site: SiteInfo) => SkyParts }> = {
  'clear-day': { description: 'clear sky, open site', parts: clearDay },
  overcast: { description: 'full overcast (CIE overcast sky), no beam', parts: overcast },
  'broken-cloud': { description: 'open site, sun blocked intermittently, breezy with gust episodes', parts: brokenCloud },
  'urban-canyon': { description: 'courtyard ringed by buildings and trees, partial shade through the day', parts: urbanCanyon },
  'glass-facade': { description: 'roof between glass towers: city horizon and facade reflections of the sun', parts: glassFacade },
  'atrium-lamps': { description: 'indoor atrium: roof glazing and lamps switched on and off', parts: atriumLamps },
  gusty: { description: 'clear day with frequent gusts above the stow limit', parts: gusty },
};

export const SCENARIO_NAMES = Object.keys(SCENARIOS);

/** An unknown name among a set of valid ones; the message lists them. */
export class UnknownNameError extends Error {
  constructor(
    readonly what: string,
    readonly given: string,
    readonly valid: readonly string[],
  ) {
    super(`unknown ${what} "${given}"; valid ${what}s: ${valid.join(', ')}`);
    this.name = 'UnknownNameError';
  }
}

export function createScenarioWorld(name: string, site: SiteInfo, rng: Rng, opts: WorldOptions = {}): SiteWorld {
  const s = SCENARIOS[name];
  if (!s) throw new UnknownNameError('scenario', name, SCENARIO_NAMES);
  return createSiteWorld(name, site, s.parts(site), rng.fork(`site:${site.code}`), opts);
}
