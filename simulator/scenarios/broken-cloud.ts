/**
 * Broken cloud over an open site: the sun is blocked intermittently (clear and covered spells of a few minutes, drawn
 * from the site's random stream). Clear spells have a brighter-than-clear diffuse sky (cloud edges); covered spells keep
 * a little beam and a bright, nearly isotropic sky. Breezy, with occasional gust episodes above the stow limit.
 */
import type { Rng } from '../rng';
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { BREEZY } from './weather';

export function brokenCloud(site: SiteInfo, opts: { clearMinutes?: number; coveredMinutes?: number } = {}): SkyParts {
  const clearMean = (opts.clearMinutes ?? 7) * 60;
  const coveredMean = (opts.coveredMinutes ?? 4) * 60;
  let covered = false;
  let leftS = -1;
  return {
    advance(_unixMs: number, dtS: number, rng: Rng) {
      if (leftS < 0) {
        covered = rng.chance(coveredMean / (clearMean + coveredMean));
        leftS = rng.exponential(covered ? coveredMean : clearMean);
      }
      leftS -= dtS;
      while (leftS <= 0) {
        covered = !covered;
        leftS += rng.exponential(covered ? coveredMean : clearMean);
      }
      return covered ? 'covered' : 'clear';
    },
    shape: (clear, sun) => {
      const cosZ = Math.max(0, Math.sin((sun.elevationDeg * Math.PI) / 180));
      return covered
        ? outdoorSky(sun, clear.dniWm2 * 0.06, clear.dhiWm2 + 0.3 * clear.dniWm2 * cosZ, 'isotropic', site.albedo)
        : outdoorSky(sun, clear.dniWm2 * 0.95, clear.dhiWm2 * 1.4, 12, site.albedo);
    },
    wind: BREEZY,
    airTemp: { meanC: 15, amplitudeC: 5 },
  };
}
