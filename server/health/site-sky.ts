/**
 * The modelled sky of a site at an instant, and the site model the detectors read, computed from the site's survey and
 * weather readings alone: no database, no clock, no I/O. The server feeds it from its repositories; anything else
 * (the offline evaluation, a test) can feed it the same inputs and get the same model.
 */
import type { SiteSurvey } from '../../shared/contracts/survey';
import { analyseLandscape, bestReachableOrientation, detectorReadings, extendedRadiance, type Sky } from '../../shared/landscape';
import { directionFromAzimuthElevation, type Vec3 } from '../../shared/sphere/directions';
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

/** Diffuse fraction (DHI / GHI) from which the sky counts as cloud-covered (common practice; from memory). */
const OVERCAST_DIFFUSE_FRACTION = 0.8;

/** Beam the station reads on its horizontal sensor per W/m² of DNI below which it tells nothing about the beam. */
const MIN_STATION_BEAM_VIEW = 0.02;

/** Horizontal irradiance of a sky's sun and sun images [W/m²] (Lambert's law: normal irradiance × cos zenith). */
function sharpHorizontalWm2(sky: Sky): number {
  let e = 0;
  for (const p of sky.pointSources) if (p.kind !== 'lamp') e += p.irradianceWm2 * Math.max(0, p.direction[2]);
  return e;
}

/**
 * The resolved (built) sky of a site at an instant. With a station reading of GHI and DHI the beam is what makes the
 * station's GHI − DHI, seen from the site with its survey: the sun where the horizon leaves it visible plus the facades'
 * images of it (a station next to a glazed facade reads the image too, and dividing GHI − DHI by cos Z alone would
 * brighten the modelled sun by it). When the survey hides the sun and its images from the station, the reading says
 * nothing about the beam, which then comes from the clear-sky model (the sky file's "DHI only" rule) with the measured DHI.
 */
export function siteSky(site: SkySite, survey: SiteSurvey, atMs: number, weather: SiteWeather | null): ResolvedSky {
  const naive = resolveSkyFile(siteSkyFile(site, survey, atMs, weather));
  const sun = naive.input.sun;
  if (!weather || weather.dhiWm2 === null || !sun || sun.elevationDeg <= 0) return naive;
  const measuredDhi = Math.min(weather.dhiWm2, weather.ghiWm2);
  // The sky is given its beam and dome; its ground then takes the GHI they make (the engine's own rule, stated as the
  // sky's GHI so the model reports the GHI it has), as the station's GHI is read behind the survey's obstructions.
  let seen = survey;
  const upZ = Math.max(0, directionFromAzimuthElevation(sun.azimuthDeg, sun.elevationDeg)[2]);
  const at = (dhiWm2: number, dniWm2: number) => {
    const file = siteSkyFile(site, seen, atMs, { ghiWm2: Math.max(weather.ghiWm2, dhiWm2), dhiWm2 });
    const ghiWm2 = dniWm2 * upZ + Math.min(2000, dhiWm2);
    return resolveSkyFile({ ...file, ghiWm2, sun: { azimuthDeg: sun.azimuthDeg, elevationDeg: sun.elevationDeg, dniWm2 } });
  };
  // The station's view of the beam: the sharp horizontal irradiance of this sky per W/m² of DNI.
  const probeDni = 1000;
  const view = sharpHorizontalWm2(at(measuredDhi, probeDni).sky) / probeDni;
  // The survey's sky type is the site's usual (clear) sky. Light nearly all diffuse at a station that could see the sun
  // means a cloud-covered sky, whose radiance is taken as uniform: the isotropic diffuse sky of Liu & Jordan (1963),
  // "The long-term average performance of flat-plate solar-energy collectors", Solar Energy 7(2):53–74 (reference from
  // memory). In the shade of the survey's obstructions, all-diffuse light says nothing about cloud.
  const seesSun = view >= MIN_STATION_BEAM_VIEW;
  if (seesSun && weather.ghiWm2 > 0 && measuredDhi / weather.ghiWm2 >= OVERCAST_DIFFUSE_FRACTION)
    seen = { ...survey, skyType: 'isotropic' };
  const { ghiWm2: _ghi, ...dhiOnly } = siteSkyFile(site, seen, atMs, { ghiWm2: weather.ghiWm2, dhiWm2: measuredDhi });
  const dniWm2 = seesSun
    ? Math.min(1500, Math.max(0, weather.ghiWm2 - measuredDhi) / view)
    : (resolveSkyFile(dhiOnly).input.sun?.dniWm2 ?? 0);
  // The sky file's DHI is the unobstructed dome's; the station reads the dome less what the survey hides, plus the
  // obstructions and facades as it sees them. Linear in the dome's DHI: two probes give the dome that reads as measured
  // (kept within half and twice the reading).
  const withDome = diffuseHorizontalWm2(at(measuredDhi, dniWm2).sky);
  const withoutDome = diffuseHorizontalWm2(at(0, dniWm2).sky);
  const domeDhi =
    measuredDhi > 0 && withDome - withoutDome > 1e-6
      ? Math.min(2 * measuredDhi, Math.max(0.5 * measuredDhi, (measuredDhi * (measuredDhi - withoutDome)) / (withDome - withoutDome)))
      : measuredDhi;
  return at(domeDhi, dniWm2);
}

/** Upward directions of a Fibonacci lattice on the hemisphere, for the station's diffuse reading. */
const HEMISPHERE: readonly Vec3[] = (() => {
  const n = 1024;
  const golden = Math.PI * (3 - Math.sqrt(5));
  return Array.from({ length: n }, (_, i) => {
    const z = 1 - (i + 0.5) / n;
    const r = Math.sqrt(1 - z * z);
    return [r * Math.cos(golden * i), r * Math.sin(golden * i), z] as Vec3;
  });
})();

/** Horizontal irradiance of a sky's extended radiance (dome, obstructions, facades) [W/m²], by equal-area quadrature. */
function diffuseHorizontalWm2(sky: Sky): number {
  let e = 0;
  for (const d of HEMISPHERE) e += extendedRadiance(sky, d) * d[2];
  return (e * 2 * Math.PI) / HEMISPHERE.length;
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
