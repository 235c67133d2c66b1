import type { SiteSurvey } from '../../shared/contracts/survey';
import type { SurveyRevision, SurveyRevisionParameter } from '../../shared/contracts/survey-revisions';
import { fitSurveyCorrections, TooFewEpochs, type FitEpoch, type SurveyFitResult } from '../../shared/survey-fit';
import type { StoredScan, StoredSurveyRevision, SurveyRevisionRepository } from '../data/survey-revision-repository';
import { AppError, conflict, notFound } from '../errors/app-error';
import { scanEpoch, scanSpan } from '../health/scan-epochs';
import { siteSky } from '../health/site-sky';
import type { AdminService } from './admin-service';
import type { Caller } from './caller';
import type { HealthService } from './health-service';
import type { SiteModelCache } from './site-model-cache';
import type { SiteModelService } from './site-model-service';

export interface SurveyRevisionOptions {
  now: () => number;
  /** Highest tilt units reach [°] (the modelled brightest orientation is searched below it). */
  maxTiltDeg: number;
  /** Fewest complete daylight scans a proposal is made from. */
  minScans: number;
  /** Most scans one fit uses (the most recent): each costs a sky build per model evaluation. */
  maxScans: number;
  /** Settled reports of the site's other units within this of a scan's middle join its epoch [ms]. */
  settledWindowMs: number;
}

export const DEFAULT_SURVEY_REVISION_OPTIONS: SurveyRevisionOptions = {
  now: Date.now,
  maxTiltDeg: 85,
  minScans: 3,
  maxScans: 12,
  settledWindowMs: 120_000,
};

/** A scan whose brightest sample is below this is taken at dusk or under heavy cloud and says little [W/m²]. */
const DAYLIGHT_SCAN_WM2 = 50;
const DAY_MS = 86_400_000;
const r1 = (x: number) => Math.round(x * 10) / 10;
const r3 = (x: number) => Math.round(x * 1000) / 1000;
const roundFor = (kind: SurveyRevisionParameter['kind'], x: number) =>
  kind === 'albedo' || kind === 'reflectance' || kind === 'stationScale' ? r3(x) : r1(x);

/** What is stored in a revision's `fit` column. */
interface StoredFit {
  parameters: SurveyRevisionParameter[];
  modelError: SurveyRevision['modelError'];
  checkError: SurveyRevision['checkError'];
  fit: SurveyRevision['fit'];
}

/** The proposed survey with its numbers rounded to what a survey states (0.1°, 0.001 reflectance). */
function roundedSurvey(s: SiteSurvey): SiteSurvey {
  return {
    ...s,
    horizon: s.horizon.map(([a, e]) => [a, r1(e)] as [number, number]),
    reflectors: s.reflectors.map((f) => ({ ...f, normalAzimuthDeg: r1(f.normalAzimuthDeg) % 360, reflectance: r3(f.reflectance) })),
  };
}

/**
 * Survey revisions: fits a site's survey to its units' recent scans and settled readings (shared/survey-fit, through the
 * same site model the detectors use), stores the result as a proposal, and applies it only when an engineer accepts it.
 * Accepting makes it the site's survey through the survey listeners a manual save runs (locked statements are marked
 * "restatement suggested", the detectors' cached model is dropped), then judges the site's open trap alarms again
 * against the new model.
 */
export class SurveyRevisionService {
  private readonly running = new Set<number>();
  private readonly opts: SurveyRevisionOptions;

  constructor(
    private readonly repo: SurveyRevisionRepository,
    private readonly admin: AdminService,
    private readonly siteModel: SiteModelService,
    private readonly models: SiteModelCache,
    private readonly health: HealthService,
    opts: Partial<SurveyRevisionOptions> = {},
  ) {
    this.opts = { ...DEFAULT_SURVEY_REVISION_OPTIONS, ...opts };
  }

  async list(c: Caller, siteId: number): Promise<SurveyRevision[]> {
    const site = await this.admin.getSite(c, siteId);
    return (await this.repo.list(site.id)).map(viewOf);
  }

  async get(c: Caller, siteId: number, id: number): Promise<SurveyRevision> {
    const site = await this.admin.getSite(c, siteId);
    const r = await this.repo.get(site.id, id);
    if (!r) throw notFound('Survey revision');
    return viewOf(r);
  }

  /** Fits the survey to the scans of the last `days` and stores the proposal (422 with too few scans, 409 while one runs). */
  async propose(c: Caller, siteId: number, days: number): Promise<SurveyRevision> {
    const site = await this.admin.getSite(c, siteId);
    const inputs = await this.siteModel.inputs(site.id);
    const unitIds = await this.repo.unitIds(site.id);
    const now = this.opts.now();
    const skyOf = (survey: SiteSurvey, albedo: number, e: FitEpoch) => siteSky({ ...inputs.site, albedo }, survey, e.atMs, e.weather).sky;
    // Daylight scans with enough samples, newest first.
    const scans: StoredScan[] = [];
    const epochs: FitEpoch[] = [];
    for (const s of await this.repo.recentScans(unitIds, new Date(now - days * DAY_MS), this.opts.maxScans * 4)) {
      if (scans.length >= this.opts.maxScans) break;
      if (s.samples.length < 8 || Math.max(...s.samples.map((x) => x[2])) < DAYLIGHT_SCAN_WM2) continue;
      scans.push(s);
      epochs.push(await this.epochOf(site.id, s, unitIds));
    }
    if (scans.length < this.opts.minScans)
      throw new AppError(
        422,
        'too_few_scans',
        `A survey revision needs at least ${this.opts.minScans} complete daylight scans of this site's units from the last ${days} days; ${scans.length === 1 ? 'there is 1' : `there are ${scans.length}`}. Send scans at different times of day, then propose again.`,
        { scans: `${scans.length} of at least ${this.opts.minScans}` },
      );
    if (this.running.has(site.id)) throw conflict('A survey fit for this site is already running; wait for its proposal.');
    this.running.add(site.id);
    try {
      const result = await fitSurveyCorrections({
        survey: inputs.survey,
        albedo: inputs.site.albedo,
        epochs,
        skyOf,
        limits: { tiltRangeDeg: [0, this.opts.maxTiltDeg], azimuthRangeDeg: [0, 360] },
        minEpochs: this.opts.minScans,
        // The engine is CPU work: other requests and the ingest get a turn between sky builds.
        pause: () => new Promise((r) => setImmediate(r)),
      }).catch((err: unknown) => {
        if (!(err instanceof TooFewEpochs)) throw err;
        throw new AppError(
          422,
          'too_few_scans',
          `A survey revision needs at least ${err.needed} scans taken with the sun clear of the site's horizon and facade edges; ` +
            `${err.usable === 1 ? 'there is 1' : `there are ${err.usable}`} of the ${scans.length} from the last ${days} days. Send scans at other times of day, then propose again.`,
          { scans: `${err.usable} of at least ${err.needed}` },
        );
      });
      const stored = storedFitOf(result, scans);
      const id = await this.repo.insertProposal({
        siteId: site.id,
        baseSurvey: inputs.survey,
        baseAlbedo: inputs.site.albedo,
        proposedSurvey: roundedSurvey(result.survey),
        proposedAlbedo: r3(result.albedo),
        fit: stored,
        proposedAt: new Date(now),
        proposedBy: c.id,
        audit: {
          scans: scans.length,
          samples: result.samples,
          modelError: stored.modelError,
          changed: stored.parameters.filter((p) => p.after !== roundFor(p.kind, p.before)).map((p) => p.key),
        },
      });
      return this.get(c, site.id, id);
    } finally {
      this.running.delete(site.id);
    }
  }

  async reject(c: Caller, siteId: number, id: number, reason: string): Promise<SurveyRevision> {
    const site = await this.admin.getSite(c, siteId);
    const outcome = await this.repo.reject(site.id, id, c.id, reason, new Date(this.opts.now()));
    await this.refuse(outcome, site.id, id);
    return this.get(c, site.id, id);
  }

  async accept(c: Caller, siteId: number, id: number, reason: string): Promise<SurveyRevision> {
    const site = await this.admin.getSite(c, siteId);
    const revision = await this.repo.get(site.id, id);
    if (!revision) throw notFound('Survey revision');
    const changed = ((revision.fit as StoredFit).parameters ?? []).filter((p) => p.after !== roundFor(p.kind, p.before));
    const outcome = await this.repo.accept(site.id, id, c.id, reason, new Date(this.opts.now()), {
      changed: changed.map((p) => ({ key: p.key, before: p.before, after: p.after })),
    });
    await this.refuse(outcome, site.id, id);
    // The same reactions as a manual survey save: statements, the detectors' cached model.
    this.siteModel.surveyChanged(site.id);
    const traps = await this.health.reassessTraps(
      site.id,
      (atMs) => this.models.build(site.id, atMs),
      // The alarm's clear reason holds 100 characters.
      (v) =>
        `survey revision ${revision.version} accepted: unit at ${Math.round(v.ratio * 100)} % of the revised best (${Math.round(v.bestWm2)} W/m²)`.slice(
          0,
          100,
        ),
    );
    await this.repo.setOutcome(id, { trapAlarmsReassessed: traps.reassessed, trapAlarmsCleared: traps.cleared });
    return this.get(c, site.id, id);
  }

  private async refuse(outcome: string, siteId: number, id: number): Promise<void> {
    if (outcome === 'done') return;
    if (outcome === 'not-found') throw notFound('Survey revision');
    if (outcome === 'survey-changed')
      throw conflict(
        "The site's survey changed after this revision was proposed, so it is superseded and nothing was applied. Propose again.",
      );
    const now = await this.repo.get(siteId, id);
    throw conflict(`This revision is already ${now?.state ?? 'decided'}; only a proposed revision can be accepted or rejected.`);
  }

  /** A scan as the fit sees it (server/health/scan-epochs.ts): its samples and the site's other units' settled reports. */
  private async epochOf(siteId: number, s: StoredScan, unitIds: number[]): Promise<FitEpoch> {
    const span = scanSpan(s.rows);
    const weather =
      (await this.siteModel.weatherMean(siteId, span.fromMs, span.toMs + 1)) ?? (await this.siteModel.weatherNear(siteId, span.atMs));
    const settled = await this.repo.settledNear(
      unitIds.filter((u) => u !== s.unitId),
      new Date(span.atMs),
      this.opts.settledWindowMs,
    );
    return scanEpoch(
      span,
      weather,
      settled.map((x) => ({ tiltDeg: x.tiltDeg, azimuthDeg: x.azimuthDeg, poaWm2: x.poaWm2 })),
    );
  }
}

function storedFitOf(r: SurveyFitResult, scans: StoredScan[]): StoredFit {
  const err = (e: SurveyFitResult['before']) => ({
    meanAbsWm2: r1(e.meanAbsWm2),
    globalMaxErrorDeg: e.globalMaxErrorDeg === null ? null : r1(e.globalMaxErrorDeg),
  });
  return {
    parameters: r.parameters.map((p) => ({
      key: p.key,
      kind: p.kind,
      label: p.label,
      unit: p.unit,
      before: p.before,
      after: roundFor(p.kind, p.after),
      uncertainty: p.uncertainty === null ? null : roundFor(p.kind, p.uncertainty),
      bounds: [roundFor(p.kind, p.bounds[0]), roundFor(p.kind, p.bounds[1])],
      status: p.status,
    })),
    modelError: { before: err(r.before), after: err(r.after), afterStationScaled: err(r.afterStationScaled) },
    checkError: r.check
      ? {
          scans: r.check.epochs,
          before: err(r.check.before),
          after: err(r.check.after),
          afterStationScaled: err(r.check.afterStationScaled),
        }
      : null,
    fit: {
      scans: scans.length - r.epochsLeftOut,
      scansLeftOut: r.epochsLeftOut,
      samples: r.samples,
      iterations: r.iterations,
      converged: r.converged,
      residualVariance: r.residualVariance === null ? null : r3(r.residualVariance),
      sources: scans.map((s) => ({ unitId: s.unitId, commandId: s.commandId, at: s.completedAt.toISOString() })),
    },
  };
}

function viewOf(r: StoredSurveyRevision): SurveyRevision {
  const f = r.fit as StoredFit;
  return {
    id: r.id,
    siteId: r.siteId,
    version: r.version,
    state: r.state,
    proposedAt: r.proposedAt.toISOString(),
    proposedBy: r.proposedBy,
    decidedAt: r.decidedAt?.toISOString() ?? null,
    decidedBy: r.decidedBy,
    reason: r.reason,
    parameters: f.parameters,
    modelError: f.modelError,
    checkError: f.checkError ?? null,
    fit: f.fit,
    baseSurvey: r.baseSurvey,
    baseAlbedo: r.baseAlbedo,
    proposedSurvey: r.proposedSurvey,
    proposedAlbedo: r.proposedAlbedo,
    outcome: (r.outcome as SurveyRevision['outcome']) ?? null,
  };
}
