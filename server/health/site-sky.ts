/**
 * The modelled sky of a site at an instant, and the site model the detectors read, computed from the site's survey and
 * weather readings alone: no database, no clock, no I/O. The server feeds it from its repositories; anything else
 * (the offline evaluation, a test) can feed it the same inputs and get the same model.
 */
import type { SiteSurvey } from '../../shared/contracts/survey';
import { analyseLandscape, bestReachableOrientation, detectorReadings, type Sky } from '../../shared/landscape';
import { parseSkyFile, resolveSkyFile, type ResolvedSky } from '../../shared/sky-file';
import { sunSeenFromSite } from '../../shared/sky-radiance';
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
 * the lamps are modelled as on; daylight comes through the roof. `diffuseOnly` passes the station's DHI alone (a shaded
 * station: see `siteSky`).
 */
export function siteSkyFile(site: SkySite, survey: SiteSurvey, atMs: number, weather: SiteWeather | null, diffuseOnly = false) {
  return parseSkyFile({
    site: { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM },
    time: new Date(atMs).toISOString(),
    albedo: site.albedo,
    skyType: survey.skyType,
    horizon: survey.horizon,
    reflectors: survey.reflectors,
    lamps: survey.lamps,
    ...(weather
      ? {
          ...(diffuseOnly ? {} : { ghiWm2: weather.ghiWm2 }),
          ...(weather.dhiWm2 !== null ? { dhiWm2: weather.dhiWm2 } : {}),
        }
      : {}),
  });
}

/**
 * A shaded station's diffuse above this multiple of the clear-sky diffuse is taken as overcast (no beam); at or below it
 * the sky is taken as clear enough for the clear-sky beam. This product's rule: a station behind the horizon measures
 * the diffuse sky only, so nothing it reads tells the beam apart.
 */
export const SHADED_STATION_CLEAR_DIFFUSE_FACTOR = 1.5;

/**
 * The resolved (built) sky of a site at an instant. A station reading taken while the survey puts the sun behind the
 * site's horizon or a facade holds no beam (GHI is diffuse only), so it is not read as "no beam": under a sky whose
 * diffuse looks clear the beam is the clear-sky model's and the diffuse the station's; under an overcast one, none.
 */
export function siteSky(site: SkySite, survey: SiteSurvey, atMs: number, weather: SiteWeather | null): ResolvedSky {
  const resolved = resolveSkyFile(siteSkyFile(site, survey, atMs, weather));
  if (!weather || !resolved.input.sun || resolved.input.sun.elevationDeg <= 0) return resolved;
  if (sunSeenFromSite(resolved.sky)) return withImagesOnStation(site, survey, atMs, weather, resolved);
  const clear = resolveSkyFile(siteSkyFile(site, survey, atMs, null));
  const dhiWm2 = weather.dhiWm2 ?? weather.ghiWm2;
  if (dhiWm2 > SHADED_STATION_CLEAR_DIFFUSE_FACTOR * (clear.input.dhiWm2 ?? 0)) return resolved;
  // DHI alone: the sky file takes the beam from the clear-sky model (shared/sky-file).
  return resolveSkyFile(siteSkyFile(site, survey, atMs, { ghiWm2: weather.ghiWm2, dhiWm2 }, true));
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

/**
 * A station in sun under a facade's image of the sun reads the image too: GHI − DHI = DNI·(v·cos Z + Σ ρ·sin e_image),
 * v the disc's visible fraction (derived from the sky's composition, shared/README.md "Sky model"), where reading it as
 * beam alone (GHI − DHI = DNI·cos Z) would make the beam too bright by the images. The beam is solved for with the
 * images the survey places, and the sky built again with it.
 */
function withImagesOnStation(site: SkySite, survey: SiteSurvey, atMs: number, weather: SiteWeather, resolved: ResolvedSky): ResolvedSky {
  const sun = resolved.input.sun!;
  const dni = sun.dniWm2 ?? 0;
  const images = resolved.sky.pointSources.filter((p) => p.kind === 'sun-image');
  if (!(dni > 0) || !images.length || weather.dhiWm2 === null) return resolved;
  const cosZ = Math.sin((sun.elevationDeg * Math.PI) / 180);
  const disc = resolved.sky.pointSources.find((p) => p.kind === 'sun');
  const visible = disc ? disc.irradianceWm2 / dni : 0;
  const perDni = visible * cosZ + images.reduce((g, p) => g + (p.irradianceWm2 / dni) * Math.max(0, p.direction[2]), 0);
  if (!(perDni > 0)) return resolved;
  const beam = Math.max(0, (weather.ghiWm2 - weather.dhiWm2) / perDni);
  return resolveSkyFile(
    parseSkyFile({
      ...siteSkyFile(site, survey, atMs, null),
      sun: { azimuthDeg: sun.azimuthDeg, elevationDeg: sun.elevationDeg, dniWm2: beam },
      ghiWm2: weather.ghiWm2,
      dhiWm2: weather.dhiWm2,
    }),
  );
}
