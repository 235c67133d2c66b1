import type { SiteSurvey } from '../../shared/contracts/survey';
import type { ResolvedSky } from '../../shared/sky-file';
import type { SiteModelInputs, SiteModelRepository } from '../data/site-model-repository';
import { notFound } from '../errors/app-error';
import { siteSky, type SiteWeather } from '../health/site-sky';
import type { AuditService } from './audit-service';
import type { Caller } from './caller';

export type { SiteWeather } from '../health/site-sky';

/**
 * The modelled sky of a site at an instant: its survey (horizon, facades, lamps) with magnitudes from its weather
 * station when it has a recent reading, else from the clear-sky model. Indoor sites see only their lamps. The
 * computation is `server/health/site-sky.ts`; this loads its inputs.
 */
export class SiteModelService {
  constructor(
    private readonly repo: SiteModelRepository,
    private readonly audit: AuditService,
  ) {}

  async survey(siteId: number): Promise<SiteSurvey> {
    const s = await this.repo.survey(siteId);
    if (!s) throw notFound('Site');
    return s;
  }

  private readonly surveyListeners: ((siteId: number) => void)[] = [];

  /** Called after a site's survey is replaced (statements of locked months suggest a restatement). */
  onSurveySaved(listener: (siteId: number) => void): void {
    this.surveyListeners.push(listener);
  }

  /** Replaces a site's survey (already validated) and records who did it. */
  async saveSurvey(by: Caller, siteId: number, survey: SiteSurvey): Promise<SiteSurvey> {
    if (!(await this.repo.saveSurvey(siteId, survey))) throw notFound('Site');
    this.surveyChanged(siteId);
    await this.audit.record(by, 'site-survey-update', `site:${siteId}`, {
      horizonPoints: survey.horizon.length,
      reflectors: survey.reflectors.length,
      lamps: survey.lamps.length,
    });
    return survey;
  }

  /**
   * Tells the survey listeners that a site's survey changed by another path than `saveSurvey` (an accepted survey
   * revision, written in its own transaction): they react exactly as to a save.
   */
  surveyChanged(siteId: number): void {
    for (const l of this.surveyListeners) l(siteId);
  }

  /** Mean station weather of a site over [fromMs, toMs), or null without readings. */
  weatherMean(siteId: number, fromMs: number, toMs: number): Promise<SiteWeather | null> {
    return this.repo.weatherMean(siteId, new Date(fromMs), new Date(toMs));
  }

  weatherNear(siteId: number, atMs: number): Promise<SiteWeather | null> {
    return this.repo.weatherNear(siteId, atMs);
  }

  /** The model inputs of a site (throws 404 for an unknown site). */
  async inputs(siteId: number): Promise<SiteModelInputs> {
    const inputs = await this.repo.inputs(siteId);
    if (!inputs) throw notFound('Site');
    return inputs;
  }

  /** The resolved sky of a site at an instant (throws 404 for an unknown site). */
  async skyAt(siteId: number, atMs: number, weather?: SiteWeather | null): Promise<ResolvedSky> {
    return (await this.skyAndInputsAt(siteId, atMs, weather)).resolved;
  }

  /** The resolved sky with the inputs it was built from, for callers that need both (one read of the site). */
  async skyAndInputsAt(
    siteId: number,
    atMs: number,
    weather?: SiteWeather | null,
  ): Promise<{ resolved: ResolvedSky; inputs: SiteModelInputs }> {
    const inputs = await this.inputs(siteId);
    const w = weather === undefined ? await this.repo.weatherNear(siteId, atMs) : weather;
    return { resolved: siteSky(inputs.site, inputs.survey, atMs, w), inputs };
  }
}
