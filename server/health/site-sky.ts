/**
 * The modelled sky of a site at an instant, and the site model the detectors read, computed from the site's survey and
 * weather readings alone: no database, no clock, no I/O. The server feeds it from its repositories; anything else
 * (the offline evaluation, a test) can feed it the same inputs and get the same model.
 */
import type { SiteSurvey } from '../../shared/contracts/survey';
import { analyseLandscape, bestReachableOrientation, detectorReadings, type Sky } from '../../shared/landscape';
import { parseSkyFile, resolveSkyFile, type ResolvedSky } from '../../shared/sky-file';
import type { SiteModel } from './site-model';

/** Where a site is and how bright its ground is. */
export interface SkySite {
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  /** Ground reflectance (0…1). */
  albedo: number;
}

/** Weather measured at a site near an instant (a station reading). */
export interface SiteWeather {
  ghiWm2: number;
  dhiWm2: number | null;
}

/**
 * The sky file of a site at an instant: the same description the command line accepts. Magnitudes come from the
 * station reading when there is one, else from the clear-sky model. Indoor sites: the walls are the horizon profile and
 * the lamps are modelled as on; daylight comes through the roof.
 */
export function siteSkyFile(site: SkySite, survey: SiteSurvey, atMs: number, weather: SiteWeather | null) {
  return parseSkyFile({
    site: { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM },
    time: new Date(atMs).toISOString(),
    albedo: site.albedo,
    skyType: survey.skyType,
    horizon: survey.horizon,
    reflectors: survey.reflectors,
    lamps: survey.lamps,
    ...(weather ? { ghiWm2: weather.ghiWm2, ...(weather.dhiWm2 !== null ? { dhiWm2: weather.dhiWm2 } : {}) } : {}),
  });
}

/** The resolved (built) sky of a site at an instant. */
export function siteSky(site: SkySite, survey: SiteSurvey, atMs: number, weather: SiteWeather | null): ResolvedSky {
  return resolveSkyFile(siteSkyFile(site, survey, atMs, weather));
}

/**
 * The site model of a resolved sky: what the detectors compare units against. `maxTiltDeg` is the highest tilt units
 * can reach (the global maximum and the local maxima are searched below it). The fuller analysis runs on first demand.
 */
export function siteModelOf(resolved: ResolvedSky, indoor: boolean, atMs: number, maxTiltDeg: number): SiteModel {
  const sky = resolved.sky;
  let analysis: ReturnType<NonNullable<SiteModel['analyse']>> | undefined;
  return {
    atMs,
    sunElevationDeg: resolved.input.sun?.elevationDeg ?? -90,
    indoor,
    globalMax: globalMaxOf(sky, maxTiltDeg),
    readings: (tiltDeg, azimuthDeg, detectorTiltDeg) =>
      detectorReadings(sky, tiltDeg, azimuthDeg, Math.min(45, Math.max(0, detectorTiltDeg))),
    analyse: () => {
      if (!analysis) {
        const r = analyseLandscape(sky, { stepDeg: 2, tiltRangeDeg: [0, maxTiltDeg] });
        analysis = { localMaxima: r.localMaxima, minSinglePeakDetectorTiltDeg: r.minSinglePeakDetectorTiltDeg };
      }
      return analysis;
    },
  };
}

/** The brightest reachable orientation of a sky with tilt up to `maxTiltDeg`, any azimuth (shared/landscape/best-orientation.ts). */
export function globalMaxOf(sky: Sky, maxTiltDeg: number) {
  return bestReachableOrientation(sky, { tiltRangeDeg: [0, maxTiltDeg], azimuthRangeDeg: [0, 360] });
}
