/**
 * The site models the evaluation hands the detectors.
 * - `truth`: the simulator's own sky at the latest step (the model is the world).
 * - `site`: what the server has: each site's survey (as the demo seed stores it, optionally perturbed by
 *   simulator/survey-error.ts) and its weather station's readings, through the server's own site-model code
 *   (`siteSky` + `siteModelOf` in server/health/site-sky.ts), rebuilt and aged as `SiteModelCache` does
 *   (`modelRefreshMs`, `modelMaxAgeMs`, `maxTiltDeg` of `DEFAULT_HEALTH_SERVICE_OPTIONS`; station reading: the latest
 *   within `WEATHER_NEAR_MS` before the build). One difference: the server answers with the previous model while it
 *   rebuilds in the background, the evaluation builds at once (the step is 5 s, the rebuild every 5 min).
 */
import { detectorNormals } from '../../shared/landscape/detector-pairs';
import { analyseLandscape } from '../../shared/landscape';
import type { SiteSurvey } from '../../shared/contracts/survey';
import type { Weather } from '../../shared/contracts/wire';
import type { SiteModel, SiteModelProvider } from '../../server/health/site-model';
import { siteModelOf, siteSky, type SiteWeather } from '../../server/health/site-sky';
import { WEATHER_NEAR_MS } from '../../server/data/site-model-repository';
import { DEFAULT_HEALTH_SERVICE_OPTIONS } from '../../server/services/health-service';
import { DEMO_SURVEYS } from '../../seeds/demo-world';
import type { Fleet } from '../../simulator/fleet';
import type { SiteInfo } from '../../simulator/scenarios';
import type { SkyField } from '../../simulator/sky-field';
import { perturbSurvey, stationError, type StationError, type SurveyErrorLevel, type SurveyedSite } from '../../simulator/survey-error';

export const EVAL_MODELS = ['site', 'truth'] as const;
export type EvalModel = (typeof EVAL_MODELS)[number];

export interface EvalSite {
  siteId: number;
  site: SiteInfo;
}

/** A model provider that is also told the station readings (the `site` model reads them; `truth` ignores them). */
export interface EvalModelProvider extends SiteModelProvider {
  weather(siteId: number, w: Weather): void;
  /** The survey and albedo each site's model was given (site model only). */
  readonly surveys: ReadonlyMap<number, SurveyedSite>;
  /** Site models built so far. */
  readonly built: () => number;
}

/** The survey the demo seed stores for a site (the model's starting point), with the site's albedo. */
export function surveyedSite(site: SiteInfo): SurveyedSite {
  const survey: SiteSurvey | undefined = DEMO_SURVEYS[site.code];
  if (!survey) throw new RangeError(`demo site ${site.code} has no survey in DEMO_SURVEYS`);
  return { survey, albedo: site.albedo };
}

/** The simulator's own sky as the model; reports within 10 s of the latest step may use it. */
export function truthModels(fleet: Fleet, sites: readonly EvalSite[], evidence: boolean): EvalModelProvider {
  const codeOf = new Map(sites.map((s) => [s.siteId, s.site.code]));
  const indoorOf = new Map(sites.map((s) => [s.siteId, s.site.indoor]));
  const current = new Map<number, { field: SkyField; model: SiteModel }>();
  const analyses = new Map<string, ReturnType<NonNullable<SiteModel['analyse']>>>();
  let built = 0;
  return {
    surveys: new Map(),
    built: () => built,
    weather() {},
    siteModel(siteId, atMs) {
      const code = codeOf.get(siteId)!;
      const c = fleet.conditions(code);
      if (!c || Math.abs(c.unixMs - atMs) > 10_000) return undefined;
      const hit = current.get(siteId);
      if (hit && hit.field === c.field) {
        hit.model.atMs = c.unixMs;
        return hit.model;
      }
      const field = c.field;
      const hourKey = `${code}@${Math.floor(c.unixMs / 3_600_000)}`;
      built++;
      const model: SiteModel = {
        atMs: c.unixMs,
        sunElevationDeg: c.sunElevationDeg,
        indoor: indoorOf.get(siteId)!,
        globalMax: fleet.bestReachable(field),
        readings(tiltDeg, azimuthDeg, detectorTiltDeg) {
          const n = detectorNormals(tiltDeg, azimuthDeg, detectorTiltDeg);
          return {
            panelWm2: field.irradiance(n.panel),
            tiltPlusWm2: field.irradiance(n.tiltPlus),
            tiltMinusWm2: field.irradiance(n.tiltMinus),
            azimuthPlusWm2: field.irradiance(n.azimuthPlus),
            azimuthMinusWm2: field.irradiance(n.azimuthMinus),
          };
        },
        analyse: evidence
          ? () => {
              let a = analyses.get(hourKey);
              if (!a) {
                const r = analyseLandscape(field.sky, { stepDeg: 2, tiltRangeDeg: [0, 85] });
                a = { localMaxima: r.localMaxima, minSinglePeakDetectorTiltDeg: r.minSinglePeakDetectorTiltDeg };
                analyses.set(hourKey, a);
              }
              return a;
            }
          : undefined,
      };
      current.set(siteId, { field, model });
      return model;
    },
  };
}

/**
 * The server's model: survey (perturbed at `surveyError`, drawn from `seed` per site) and station readings (with the
 * level's station error) through `siteSky` and `siteModelOf`, cached per site like `SiteModelCache`.
 */
export function siteModels(o: {
  now: () => number;
  sites: readonly EvalSite[];
  surveyError: SurveyErrorLevel;
  seed: number;
  /** Keep the model's full landscape analysis for trap evidence (slow; it never changes what is detected). */
  evidence?: boolean;
}): EvalModelProvider {
  const { modelRefreshMs, modelMaxAgeMs, maxTiltDeg } = DEFAULT_HEALTH_SERVICE_OPTIONS;
  const info = new Map<number, { site: SiteInfo; given: SurveyedSite; station: StationError }>();
  for (const s of o.sites)
    info.set(s.siteId, {
      site: s.site,
      given: perturbSurvey(surveyedSite(s.site), o.surveyError, `${o.seed}:${s.site.code}`),
      station: stationError(o.surveyError, `${o.seed}:${s.site.code}`),
    });
  const lastReading = new Map<number, { atMs: number; reading: SiteWeather }>();
  const models = new Map<number, { model: SiteModel; builtMs: number }>();
  let built = 0;
  const build = (siteId: number, atMs: number): SiteModel => {
    const s = info.get(siteId)!;
    const r = lastReading.get(siteId);
    const weather = r && r.atMs <= atMs && r.atMs > atMs - WEATHER_NEAR_MS ? r.reading : null;
    const { site, given } = s;
    const resolved = siteSky(
      { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, albedo: given.albedo },
      given.survey,
      atMs,
      weather,
    );
    built++;
    const model = siteModelOf(resolved, site.indoor, atMs, maxTiltDeg);
    return o.evidence ? model : { ...model, analyse: undefined };
  };
  return {
    surveys: new Map([...info].map(([id, s]) => [id, s.given])),
    built: () => built,
    weather(siteId, w) {
      const s = info.get(siteId);
      if (!s) return;
      lastReading.set(siteId, { atMs: Date.parse(w.ts), reading: s.station.read({ ghiWm2: w.ghiWm2, dhiWm2: w.dhiWm2 ?? null }) });
    },
    siteModel(siteId, atMs) {
      if (!info.has(siteId)) return undefined;
      const now = o.now();
      let hit = models.get(siteId);
      if (!hit || now - hit.builtMs > modelRefreshMs) models.set(siteId, (hit = { model: build(siteId, now), builtMs: now }));
      if (Math.abs(hit.model.atMs - atMs) > modelMaxAgeMs) return undefined;
      return hit.model;
    },
  };
}
