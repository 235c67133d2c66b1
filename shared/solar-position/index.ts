/**
 * Solar position for a site and instant, built on the full NREL SPA (Reda & Andreas 2008).
 *
 * Conventions used throughout Brightward's engine:
 * - azimuths (sun, panel normal, surfaces) are measured clockwise from true north, in degrees;
 * - panel/surface orientation is tilt (slope) from horizontal, 0 = facing straight up;
 * - longitude is east-positive;
 * - times are instants with an explicit UTC offset (see parseInstant).
 */
import { deltaTSecondsEspenakMeeus, decimalYear } from './delta-t-espenak-meeus-2006';
import { localDayStartUnixMs } from './instant';
import { spaRiseTransitSet, spaSolarPosition, type SpaResult } from './spa-reda-andreas-2008';

export { parseInstant, formatInstant, localDayStartUnixMs, type Instant } from './instant';
export {
  spaSolarPosition,
  spaRiseTransitSet,
  spaGeocentric,
  horizonCoordinates,
  julianDayFromUnixMs,
  type SpaInput,
  type SpaResult,
} from './spa-reda-andreas-2008';
export { deltaTSecondsEspenakMeeus } from './delta-t-espenak-meeus-2006';

const RAD = Math.PI / 180;
const DEG = 180 / Math.PI;

/** A site on the ground. */
export interface Site {
  latitudeDeg: number;
  /** East positive. */
  longitudeDeg: number;
  elevationM: number;
}

/** Optional atmosphere and time-scale settings; defaults are stated per field. */
export interface SolarPositionOptions {
  /** Default: standard-atmosphere pressure at the site's elevation. */
  pressureHpa?: number;
  /** Default 15 °C (standard atmosphere). */
  temperatureC?: number;
  /** ΔT = TT − UT1 (s). Default: Espenak & Meeus 2006 polynomial for the year. */
  deltaTS?: number;
  /**
   * ΔUT1 = UT1 − UTC (s), |ΔUT1| ≤ 0.9 (UTC is kept within 0.9 s of UT1 by leap seconds; IERS Bulletin A publishes the
   * value). Default 0: the instant is taken as UT1, up to 0.9 s off (≈ 0.004° of hour angle).
   */
  deltaUt1S?: number;
}

/** Largest |ΔUT1| [s]: leap seconds keep UTC within 0.9 s of UT1. */
export const MAX_ABS_DELTA_UT1_S = 0.9;

/** Sun position in the engine's conventions. */
export interface SunPosition {
  zenithDeg: number;
  elevationDeg: number;
  /** Clockwise from true north. */
  azimuthDeg: number;
  /** Without refraction (e0 of SPA eq. 41). */
  elevationNoRefractionDeg: number;
  /** 90° − elevationNoRefractionDeg: the zenith angle without refraction. */
  zenithNoRefractionDeg: number;
  declinationDeg: number;
  equationOfTimeMin: number;
  earthSunDistanceAu: number;
  deltaTS: number;
  deltaUt1S: number;
  pressureHpa: number;
  temperatureC: number;
  spa: SpaResult;
}

/** Pressure (hPa) of the ISO 2533 standard atmosphere at an elevation (m), troposphere formula. */
export function standardPressureHpa(elevationM: number): number {
  return 1013.25 * Math.pow(1 - 2.25577e-5 * elevationM, 5.25588);
}

function requireRange(value: number, field: string, lo: number, hi: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < lo || value > hi) {
    throw new RangeError(`${field}: must be a finite number in [${lo}, ${hi}]; got ${value}`);
  }
}

/** Throw a RangeError naming the field when a site or instant is outside what SPA accepts. */
export function validateSiteAndInstant(site: Site, unixMs: number): void {
  requireRange(site.latitudeDeg, 'latitudeDeg', -90, 90);
  requireRange(site.longitudeDeg, 'longitudeDeg', -180, 180);
  requireRange(site.elevationM, 'elevationM', -6_500_000, 100_000);
  // SPA's validity: years −2000 … 6000
  requireRange(unixMs, 'time (epoch ms)', Date.UTC(-2000, 0, 1), Date.UTC(6000, 11, 31));
}

/** Topocentric sun position (SPA) for a site and instant (epoch ms). */
export function solarPosition(site: Site, unixMs: number, options: SolarPositionOptions = {}): SunPosition {
  validateSiteAndInstant(site, unixMs);
  if (options.pressureHpa !== undefined) requireRange(options.pressureHpa, 'pressureHpa', 0, 5000);
  if (options.temperatureC !== undefined) requireRange(options.temperatureC, 'temperatureC', -273, 6000);
  if (options.deltaTS !== undefined) requireRange(options.deltaTS, 'deltaTS', -8000, 8000);
  if (options.deltaUt1S !== undefined) requireRange(options.deltaUt1S, 'deltaUt1S', -MAX_ABS_DELTA_UT1_S, MAX_ABS_DELTA_UT1_S);
  const deltaTS = options.deltaTS ?? deltaTSecondsEspenakMeeus(decimalYear(unixMs));
  const deltaUt1S = options.deltaUt1S ?? 0;
  const pressureHpa = options.pressureHpa ?? standardPressureHpa(site.elevationM);
  const temperatureC = options.temperatureC ?? 15;
  const spa = spaSolarPosition({
    unixMs,
    deltaUt1S,
    deltaTS,
    latitudeDeg: site.latitudeDeg,
    longitudeDeg: site.longitudeDeg,
    elevationM: site.elevationM,
    pressureHpa,
    temperatureC,
  });
  return {
    zenithDeg: spa.zenithDeg,
    elevationDeg: spa.elevationDeg,
    azimuthDeg: spa.azimuthDeg,
    elevationNoRefractionDeg: spa.elevationNoRefractionDeg,
    zenithNoRefractionDeg: 90 - spa.elevationNoRefractionDeg,
    declinationDeg: spa.topocentricDeclinationDeg,
    equationOfTimeMin: spa.equationOfTimeMin,
    earthSunDistanceAu: spa.earthRadiusVectorAu,
    deltaTS,
    deltaUt1S,
    pressureHpa,
    temperatureC,
    spa,
  };
}

/** Unit vector [east, north, up] of a direction given by azimuth (clockwise from north) and elevation. */
export function directionFromAzimuthElevation(azimuthDeg: number, elevationDeg: number): [number, number, number] {
  const a = azimuthDeg * RAD;
  const e = elevationDeg * RAD;
  return [Math.sin(a) * Math.cos(e), Math.cos(a) * Math.cos(e), Math.sin(e)];
}

/** Unit normal [east, north, up] of a plane with tilt from horizontal and azimuth clockwise from north. */
export function normalFromTiltAzimuth(tiltDeg: number, azimuthDeg: number): [number, number, number] {
  return directionFromAzimuthElevation(azimuthDeg, 90 - tiltDeg);
}

/** Incidence angle (deg) of the sun on a plane: cos θ = n·s (identical to SPA eq. 47 with γ = azimuth − 180°). */
export function incidenceAngleDeg(sunZenithDeg: number, sunAzimuthDeg: number, slopeDeg: number, surfaceAzimuthDeg: number): number {
  const z = sunZenithDeg * RAD;
  const b = slopeDeg * RAD;
  const c = Math.cos(z) * Math.cos(b) + Math.sin(z) * Math.sin(b) * Math.cos((sunAzimuthDeg - surfaceAzimuthDeg) * RAD);
  return Math.acos(Math.max(-1, Math.min(1, c))) * DEG;
}

/** Sunrise, transit and sunset of one local calendar day. */
export interface SunEvents {
  /** Start of the local day (00:00 at the given offset), epoch ms. */
  dayStartUnixMs: number;
  sunriseUnixMs: number | null;
  transitUnixMs: number | null;
  sunsetUnixMs: number | null;
  /** 'sun-always-up' / 'sun-always-down' when the sun does not cross the rise/set altitude that day. */
  kind: 'normal' | 'sun-always-up' | 'sun-always-down';
}

/**
 * Sunrise, transit and sunset of the local calendar day (at `offsetMinutes`) containing `unixMs`.
 *
 * Unlike SPA Appendix A.2, which works on the UT day starting at 0 h UT (so at UTC−7 its "sunset" is the previous
 * local evening), this finds the events inside the local day [00:00, 24:00) by root-finding on the full SPA:
 * rise/set where the topocentric elevation without refraction equals −(0.26667° + refraction 0.5667°) — the
 * criterion of A.2 — and transit where the topocentric hour angle crosses 0. Times to ≈ 1 ms of the root.
 */
export function sunEventsOfLocalDay(site: Site, unixMs: number, offsetMinutes: number, options: SolarPositionOptions = {}): SunEvents {
  validateSiteAndInstant(site, unixMs);
  const start = localDayStartUnixMs(unixMs, offsetMinutes);
  const deltaTS = options.deltaTS ?? deltaTSecondsEspenakMeeus(decimalYear(start + 43_200_000));
  const h0 = -(0.26667 + 0.5667);
  const deltaUt1S = options.deltaUt1S ?? 0;
  const geo = (t: number) =>
    spaSolarPosition({
      unixMs: t,
      deltaUt1S,
      deltaTS,
      latitudeDeg: site.latitudeDeg,
      longitudeDeg: site.longitudeDeg,
      elevationM: site.elevationM,
      pressureHpa: 1010,
      temperatureC: 10,
    });
  const elev = (t: number) => geo(t).elevationNoRefractionDeg - h0;
  const hourSin = (t: number) => Math.sin(geo(t).topocentricHourAngleDeg * RAD);
  const stepMs = 20 * 60_000;
  const n = 86_400_000 / stepMs;
  const bisect = (f: (t: number) => number, a: number, b: number, fa: number): number => {
    let lo = a;
    let hi = b;
    let flo = fa;
    for (let i = 0; i < 40 && hi - lo > 0.5; i++) {
      const mid = (lo + hi) / 2;
      const fm = f(mid);
      if (fm < 0 === flo < 0) {
        lo = mid;
        flo = fm;
      } else hi = mid;
    }
    return (lo + hi) / 2;
  };
  let sunrise: number | null = null;
  let sunset: number | null = null;
  let transit: number | null = null;
  let prevE = elev(start);
  let prevH = hourSin(start);
  let anyUp = prevE > 0;
  let anyDown = prevE <= 0;
  for (let i = 1; i <= n; i++) {
    const t = start + i * stepMs;
    const e = elev(t);
    const h = hourSin(t);
    if (e > 0) anyUp = true;
    else anyDown = true;
    if (sunrise === null && prevE <= 0 && e > 0) sunrise = bisect(elev, t - stepMs, t, prevE);
    if (sunset === null && prevE > 0 && e <= 0) sunset = bisect(elev, t - stepMs, t, prevE);
    // The hour angle goes from −180° through 0° (transit) to +180°: sin H′ changes sign from − to + at transit.
    const cosH = Math.cos(geo(t).topocentricHourAngleDeg * RAD);
    if (transit === null && prevH < 0 && h >= 0 && cosH > 0) transit = bisect(hourSin, t - stepMs, t, prevH);
    prevE = e;
    prevH = h;
  }
  const inDay = (x: number | null) => (x !== null && x >= start && x < start + 86_400_000 ? x : null);
  const kind: SunEvents['kind'] = anyUp && anyDown ? 'normal' : anyUp ? 'sun-always-up' : 'sun-always-down';
  return { dayStartUnixMs: start, sunriseUnixMs: inDay(sunrise), transitUnixMs: inDay(transit), sunsetUnixMs: inDay(sunset), kind };
}

/** SPA Appendix A.2 for the UT day whose date equals the local calendar date of `unixMs` at `offsetMinutes` (as NREL's code does). */
export function spaEventsForLocalDate(site: Site, unixMs: number, offsetMinutes: number, deltaTS: number) {
  const localStart = localDayStartUnixMs(unixMs, offsetMinutes);
  const utDayStart = localStart + offsetMinutes * 60_000; // 0 h UT of the same calendar date
  return spaRiseTransitSet({ utDayStartUnixMs: utDayStart, deltaTS, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg });
}
export { declinationCooperDeg } from './declination-cooper-1969';
export { equationOfTimeSpencerMin } from './equation-of-time-spencer-1971';
