import type { SiteSurvey } from '../../shared/contracts/survey';
import type { SiteWeather, SkySite } from '../health/site-sky';
import type { Db } from './db';

/** The survey of a site that has none stored yet: an open isotropic sky. */
export const EMPTY_SURVEY: SiteSurvey = { skyType: 'isotropic', horizon: [], reflectors: [], lamps: [] };

/** A site's model inputs as stored: where it is, what it sees, and whether it is indoors. */
export interface SiteModelInputs {
  site: SkySite;
  survey: SiteSurvey;
  indoor: boolean;
}

/** How far back a station reading still describes the site's weather [ms]. */
export const WEATHER_NEAR_MS = 15 * 60_000;

/** What the site model is computed from: a site's location and survey, and its stored weather-station readings. */
export class SiteModelRepository {
  constructor(private readonly db: Db) {}

  /** The site's survey (the empty one when none is stored); undefined for an unknown site. */
  async survey(siteId: number): Promise<SiteSurvey | undefined> {
    const row = await this.db('sites').where({ id: siteId }).first('survey');
    return row ? surveyOf(row.survey) : undefined;
  }

  /** Replaces the site's survey; returns whether the site exists. */
  async saveSurvey(siteId: number, survey: SiteSurvey): Promise<boolean> {
    const n = await this.db('sites')
      .where({ id: siteId })
      .update({ survey: JSON.stringify(survey) });
    return n > 0;
  }

  /** Location, survey and indoor flag of a site; undefined for an unknown site. */
  async inputs(siteId: number): Promise<SiteModelInputs | undefined> {
    const row = await this.db('sites').where({ id: siteId }).first();
    if (!row) return undefined;
    return {
      site: { latitudeDeg: row.latitude_deg, longitudeDeg: row.longitude_deg, elevationM: row.elevation_m, albedo: row.albedo },
      survey: surveyOf(row.survey),
      indoor: Boolean(row.indoor),
    };
  }

  /** Whether a site is indoors (false for an unknown site). */
  async indoor(siteId: number): Promise<boolean> {
    const r = await this.db('sites').where({ id: siteId }).first('indoor');
    return Boolean(r?.indoor);
  }

  /** Mean station weather of a site over a window (a 15-minute bucket). */
  weatherMean(siteId: number, from: Date, to: Date): Promise<SiteWeather | null> {
    return weatherMeanOf(this.db, siteId, from, to);
  }

  /** Weather measured at a site near an instant: the latest station reading within 15 minutes before it. */
  async weatherNear(siteId: number, atMs: number): Promise<SiteWeather | null> {
    const row = await this.db('weather')
      .where('site_id', siteId)
      .andWhere('ts', '<=', new Date(atMs))
      .andWhere('ts', '>', new Date(atMs - WEATHER_NEAR_MS))
      .orderBy('ts', 'desc')
      .first('ghi_wm2', 'dhi_wm2');
    return row ? { ghiWm2: row.ghi_wm2, dhiWm2: row.dhi_wm2 } : null;
  }
}

/** Mean of the station readings of a site in [from, to) (DHI only when every reading has one); null without readings. */
export async function weatherMeanOf(db: Db, siteId: number, from: Date, to: Date): Promise<SiteWeather | null> {
  const row = await db('weather')
    .where('site_id', siteId)
    .andWhere('ts', '>=', from)
    .andWhere('ts', '<', to)
    .first(db.raw('COUNT(*) AS n'), db.raw('AVG(ghi_wm2) AS ghi'), db.raw('AVG(dhi_wm2) AS dhi'), db.raw('COUNT(dhi_wm2) AS ndhi'));
  if (!row || !Number(row.n)) return null;
  return { ghiWm2: Number(row.ghi), dhiWm2: Number(row.ndhi) === Number(row.n) ? Number(row.dhi) : null };
}

/** The stored survey column (JSON text, or parsed by the driver; null before a survey was saved). */
function surveyOf(value: unknown): SiteSurvey {
  const s = (typeof value === 'string' ? JSON.parse(value) : value) as SiteSurvey | null;
  return s ?? EMPTY_SURVEY;
}
