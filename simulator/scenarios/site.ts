/**
 * What a scenario needs to know about a site, and what it gives back at each instant: the sky field every unit on the
 * site reads, the sun, and the weather (the site station's quantities).
 */
import {
  absoluteAirMass,
  clearSkyIneichenPerez,
  dayOfYearUtc,
  extraterrestrialNormalIrradianceWm2,
  relativeAirMassKastenYoung,
} from '../../shared/clear-sky';
import { solarPosition } from '../../shared/solar-position';
import { buildSky, type SkyInput } from '../../shared/sky-radiance';
import type { Rng } from '../rng';
import { directionFromAzimuthElevation, skyField, type SkyField, type Vec3 } from '../sky-field';
import { createWind, type WindProfile, type WindState, airTemperatureC, stepWind } from './weather';

export interface SiteInfo {
  name: string;
  code: string;
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  albedo: number;
  indoor: boolean;
}

export interface WeatherNow {
  ghiWm2: number;
  dhiWm2: number;
  airTempC: number;
  windMs: number;
  gustMs: number;
}

export interface SiteConditions {
  unixMs: number;
  field: SkyField;
  /** Sun direction when above the horizon, else null. */
  sunDir: Vec3 | null;
  sunElevationDeg: number;
  sunAzimuthDeg: number;
  weather: WeatherNow;
}

/** A site under a scenario: its own weather processes, stepped forward in time. */
export interface SiteWorld {
  readonly site: SiteInfo;
  readonly scenario: string;
  /** Whether a weather station on site publishes (outdoor sites). */
  readonly hasWeatherStation: boolean;
  /** Advances the site's processes by dt seconds to `unixMs` and returns the conditions there. */
  at(unixMs: number, dtS: number): SiteConditions;
}

export interface SkyParts {
  /** Linke turbidity for the clear-sky magnitudes; default 3.5. */
  linkeTurbidity?: number;
  /** Shapes the sky input of the instant from the clear-sky values. */
  shape(
    clear: { dniWm2: number; dhiWm2: number; ghiWm2: number },
    sun: { azimuthDeg: number; elevationDeg: number },
    unixMs: number,
  ): SkyInput;
  /** Per-step process update (clouds, lamps), called before `shape`; returns a key of the process state, and a change of key rebuilds the sky. */
  advance?(unixMs: number, dtS: number, rng: Rng): string;
  wind: WindProfile;
  airTemp: { meanC: number; amplitudeC: number };
}

export interface WorldOptions {
  /** Rebuild the sky at least this often [s of simulated time]; default 60. */
  skyRefreshS?: number;
}

/** Clear-sky beam and diffuse for a site and sun position (Ineichen–Perez with Kasten–Young air mass). */
export function clearSky(site: SiteInfo, apparentZenithDeg: number, pressureHpa: number, unixMs: number, linkeTurbidity = 3.5) {
  if (apparentZenithDeg >= 90) return { ghiWm2: 0, dniWm2: 0, dhiWm2: 0 };
  return clearSkyIneichenPerez({
    apparentZenithDeg,
    absoluteAirMass: absoluteAirMass(relativeAirMassKastenYoung(apparentZenithDeg), pressureHpa),
    linkeTurbidity,
    altitudeM: site.elevationM,
    extraterrestrialNormalWm2: extraterrestrialNormalIrradianceWm2(dayOfYearUtc(unixMs)),
  });
}

/** Builds a SiteWorld from the parts of a scenario. */
export function createSiteWorld(scenario: string, site: SiteInfo, parts: SkyParts, rng: Rng, opts: WorldOptions = {}): SiteWorld {
  const refreshMs = (opts.skyRefreshS ?? 60) * 1000;
  const procRng = rng.fork('sky');
  const wind: WindState = createWind(parts.wind, rng.fork('wind'));
  let cached: SiteConditions | null = null;
  let cachedState = '';
  let builtAt = -Infinity;
  let cachedDark = false;
  return {
    site,
    scenario,
    hasWeatherStation: !site.indoor,
    at(unixMs, dtS) {
      const state = parts.advance?.(unixMs, dtS, procRng) ?? '';
      stepWind(wind, dtS);
      // A process state change (cloud edge, lamp switch) rebuilds the sky even between refreshes.
      if (cached === null || unixMs - builtAt >= refreshMs || unixMs < builtAt || state !== cachedState) {
        const sp = solarPosition({ latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM }, unixMs);
        // Night outdoors: the clear-sky magnitudes are zero, so the sky is the dark one already built; only the sun moves.
        const darkNow = !site.indoor && sp.zenithDeg >= 90;
        if (darkNow && cachedDark && cached !== null && state === cachedState && unixMs >= builtAt) {
          builtAt = unixMs;
          cached = { ...cached, unixMs, sunElevationDeg: sp.elevationDeg, sunAzimuthDeg: sp.azimuthDeg };
          return withWeather(cached, unixMs);
        }
        cachedDark = darkNow;
        const clear = clearSky(site, sp.zenithDeg, sp.pressureHpa, unixMs, parts.linkeTurbidity);
        const sun = { azimuthDeg: sp.azimuthDeg, elevationDeg: sp.elevationDeg };
        const shaped = parts.shape(clear, sun, unixMs);
        const field = skyField(buildSky(shaped));
        cachedState = state;
        builtAt = unixMs;
        cached = {
          unixMs,
          field,
          sunDir: sp.elevationDeg > 0 ? directionFromAzimuthElevation(sp.azimuthDeg, sp.elevationDeg) : null,
          sunElevationDeg: sp.elevationDeg,
          sunAzimuthDeg: sp.azimuthDeg,
          weather: { ghiWm2: 0, dhiWm2: 0, airTempC: 0, windMs: 0, gustMs: 0 },
        };
      }
      return withWeather(cached!, unixMs);
    },
  };

  function withWeather(c: SiteConditions, unixMs: number): SiteConditions {
    const airTempC =
      airTemperatureC(parts.airTemp.meanC, parts.airTemp.amplitudeC, site.longitudeDeg, unixMs) +
      (site.indoor ? 0 : c.field.ghiWm2 * 0.002);
    return {
      ...c,
      unixMs,
      weather: {
        ghiWm2: c.field.ghiWm2,
        dhiWm2: c.field.dhiWm2,
        airTempC,
        windMs: site.indoor ? 0 : wind.windMs,
        gustMs: site.indoor ? 0 : wind.gustMs,
      },
    };
  }
}

/** A site whose sky and weather stay as they were at `skyUnixMs` while time goes on (checks at one instant of a scenario). */
export function frozenWorld(world: SiteWorld, skyUnixMs: number): SiteWorld {
  const c = world.at(skyUnixMs, 0);
  return {
    site: world.site,
    scenario: `${world.scenario} (frozen)`,
    hasWeatherStation: world.hasWeatherStation,
    at: (unixMs) => ({ ...c, unixMs }),
  };
}
