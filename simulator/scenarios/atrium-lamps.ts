/**
 * Indoor atrium: daylight only through the roof glazing (the atrium walls hide everything below 45°, glazing passes 55 %)
 * and banks of wall and ceiling lamps switched on and off through the day, with occasional manual switching. Lamps far
 * apart make a many-lobed landscape. Lamps and walls from the demo world's survey (shared/demo-world).
 */
import { ATRIUM_LAMPS, ATRIUM_WALL_DEG, type ScheduledLamp } from '../../shared/demo-world';
import type { Rng } from '../rng';
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { CALM } from './weather';

export const GLAZING_TRANSMITTANCE = 0.55;

export function atriumLamps(site: SiteInfo, lamps: readonly ScheduledLamp[] = ATRIUM_LAMPS): SkyParts {
  // Manual switching: each lamp may be flipped against its schedule for a while.
  const override: number[] = lamps.map(() => 0); // remaining seconds of a manual flip
  let on: boolean[] = lamps.map(() => false);
  return {
    advance(unixMs: number, dtS: number, rng: Rng) {
      const solarHour = (((unixMs / 3_600_000 + site.longitudeDeg / 15) % 24) + 24) % 24;
      on = lamps.map((l, i) => {
        if (override[i]! > 0) override[i] = override[i]! - dtS;
        else if (rng.chance(dtS / (3 * 3600))) override[i] = rng.exponential(40 * 60);
        const scheduled = solarHour >= l.onHour && solarHour < l.offHour;
        return override[i]! > 0 ? !scheduled : scheduled;
      });
      return on.map((b) => (b ? '1' : '0')).join('');
    },
    shape: (clear, sun) =>
      outdoorSky(sun, clear.dniWm2 * GLAZING_TRANSMITTANCE, clear.dhiWm2 * GLAZING_TRANSMITTANCE, 'isotropic', site.albedo, {
        horizon: [[0, ATRIUM_WALL_DEG]],
        lamps: lamps
          .filter((_, i) => on[i])
          .map(({ azimuthDeg, elevationDeg, irradianceWm2 }) => ({ azimuthDeg, elevationDeg, irradianceWm2 })),
      }),
    wind: CALM,
    airTemp: { meanC: 21, amplitudeC: 1.5 },
  };
}
