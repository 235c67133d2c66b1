import { surveySchema, type SiteSurvey } from '../../shared/contracts/survey';
import { resolveSkyFile, parseSkyFile, type ResolvedSky } from '../../shared/sky-file';
import type { Db } from '../data/db';
import { notFound } from '../errors/app-error';
import { validationError } from '../errors/validation-error';

export const EMPTY_SURVEY: SiteSurvey = { skyType: 'isotropic', horizon: [], reflectors: [], lamps: [] };

/** Weather measured at a site near an instant (the latest station reading within 15 minutes). */
export interface SiteWeather {
  ghiWm2: number;
  dhiWm2: number | null;
}

/**
 * The modelled sky of a site at an instant: its survey (horizon, facades, lamps) with magnitudes from its weather
 * station when it has a recent reading, else from the clear-sky model. Indoor sites see only their lamps.
 */
export class SiteModelService {
  constructor(private readonly db: Db) {}

  async survey(siteId: number): Promise<SiteSurvey> {
    const row = await this.db('sites').where({ id: siteId }).first('survey');
    if (!row) throw notFound('Site');
    const s = typeof row.survey === 'string' ? JSON.parse(row.survey) : row.survey;
    return s ?? EMPTY_SURVEY;
  }

  async saveSurvey(siteId: number, survey: unknown): Promise<SiteSurvey> {
    const r = surveySchema.safeParse(survey);
    if (!r.success) throw validationError(r.error, 'The survey');
    const n = await this.db('sites').where({ id: siteId }).update({ survey: JSON.stringify(r.data) });
    if (!n) throw notFound('Site');
    return r.data as SiteSurvey;
  }

  async weatherNear(siteId: number, atMs: number): Promise<SiteWeather | null> {
    const row = await this.db('weather')
      .where('site_id', siteId)
      .andWhere('ts', '<=', new Date(atMs))
      .andWhere('ts', '>', new Date(atMs - 15 * 60_000))
      .orderBy('ts', 'desc')
      .first('ghi_wm2', 'dhi_wm2');
    return row ? { ghiWm2: row.ghi_wm2, dhiWm2: row.dhi_wm2 } : null;
  }

  /** The resolved sky of a site at an instant (throws 404 for an unknown site). */
  async skyAt(siteId: number, atMs: number, weather?: SiteWeather | null): Promise<ResolvedSky> {
    const site = await this.db('sites').where({ id: siteId }).first();
    if (!site) throw notFound('Site');
    const survey: SiteSurvey = (typeof site.survey === 'string' ? JSON.parse(site.survey) : site.survey) ?? EMPTY_SURVEY;
    const w = weather === undefined ? await this.weatherNear(siteId, atMs) : weather;
    return resolveSkyFile(siteSkyFile(site, survey, atMs, w));
  }
}

/** The sky file of a site at an instant: the same description the command line accepts. */
export function siteSkyFile(
  site: { latitude_deg: number; longitude_deg: number; elevation_m: number; albedo: number; indoor: number | boolean },
  survey: SiteSurvey,
  atMs: number,
  weather: SiteWeather | null,
) {
  // Indoor sites: the walls are the horizon profile and the lamps are modelled as on; daylight comes through the roof.
  void site.indoor;
  return parseSkyFile({
    site: { latitudeDeg: site.latitude_deg, longitudeDeg: site.longitude_deg, elevationM: site.elevation_m },
    time: new Date(atMs).toISOString(),
    albedo: site.albedo,
    skyType: survey.skyType,
    horizon: survey.horizon,
    reflectors: survey.reflectors,
    lamps: survey.lamps,
    ...(weather ? { ghiWm2: weather.ghiWm2, ...(weather.dhiWm2 !== null ? { dhiWm2: weather.dhiWm2 } : {}) } : {}),
  });
}
