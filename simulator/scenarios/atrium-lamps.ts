/**
 * Indoor atrium: daylight only through the roof glazing (the atrium walls hide everything below 45°, glazing passes 55 %)
 * and banks of wall and ceiling lamps switched on and off through the day, with occasional manual switching. Lamps far
 * apart make a many-lobed landscape. Invented layout, demo and checks only.
 */
import type { LampInput } from '../../shared/sky-radiance';
import type { Rng } from '../rng';
import { outdoorSky } from './outdoor';
import type { SiteInfo, SkyParts } from './site';
import { CALM } from './weather';

export interface ScheduledLamp extends LampInput {
  /** On between these local solar hours. */
  onHour: number;
  offHour: number;
}

export const ATRIUM_LAMPS: readonly ScheduledLamp[] = [
  { azimuthDeg: 40, elevationDeg: 35, irradianceWm2: 120, onHour: 6.5, offHour: 10 },
  { azimuthDeg: 130, elevationDeg: 30, irradianceWm2: 90, onHour: 6.5, offHour: 10 },
  { azimuthDeg: 180, elevationDeg: 70, irradianceWm2: 60, onHour: 8, offHour: 18 },
  { azimuthDeg: 220, elevationDeg: 35, irradianceWm2: 110, onHour: 15, offHour: 21 },
  { azimuthDeg: 310, elevationDeg: 40, irradianceWm2: 100, onHour: 15, offHour: 21 },
];

export const ATRIUM_WALL_DEG = 45;
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
        lamps: lamps.filter((_, i) => on[i]).map(({ azimuthDeg, elevationDeg, irradianceWm2 }) => ({ azimuthDeg, elevationDeg, irradianceWm2 })),
      }),
    wind: CALM,
    airTemp: { meanC: 21, amplitudeC: 1.5 },
  };
}
