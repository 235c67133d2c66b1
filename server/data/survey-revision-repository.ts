import type { Knex } from 'knex';
import type { SiteSurvey } from '../../shared/contracts/survey';
import type { SurveyRevisionState } from '../../shared/contracts/survey-revisions';
import { appendAudit } from './audit-repository';
import type { Db } from './db';

/** A revision as stored; `fit` and `outcome` are the service's JSON (parameters, model error, scans used). */
export interface StoredSurveyRevision {
  id: number;
  siteId: number;
  version: number;
  state: SurveyRevisionState;
  baseSurvey: SiteSurvey;
  baseAlbedo: number;
  proposedSurvey: SiteSurvey;
  proposedAlbedo: number;
  fit: unknown;
  proposedAt: Date;
  proposedBy: { id: number; name: string } | null;
  decidedAt: Date | null;
  decidedBy: { id: number; name: string } | null;
  reason: string | null;
  outcome: unknown;
}

export interface NewSurveyRevision {
  siteId: number;
  baseSurvey: SiteSurvey;
  baseAlbedo: number;
  proposedSurvey: SiteSurvey;
  proposedAlbedo: number;
  fit: unknown;
  proposedAt: Date;
  proposedBy: number;
  /** Audit detail of the proposal. */
  audit: Record<string, unknown>;
}

/** One complete scan of a unit: its rows of samples `[tiltDeg, azimuthDeg, poaWm2]` as reported, and when it ended. */
export interface StoredScan {
  unitId: number;
  commandId: string;
  completedAt: Date;
  rows: { ts: number; samples: [number, number, number][] }[];
  samples: [number, number, number][];
}

/** A settled report of a unit: where it pointed and what it got. */
export interface SettledReading {
  unitId: number;
  ts: Date;
  tiltDeg: number;
  azimuthDeg: number;
  poaWm2: number;
}

export type DecideOutcome = 'done' | 'not-found' | 'not-proposed' | 'survey-changed';

type Row = Record<string, unknown>;
const json = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;
const person = (id: unknown, name: unknown) =>
  id === null || id === undefined ? null : { id: Number(id), name: String(name ?? `Person ${id}`) };

/** JSON with object keys sorted, so two equal surveys compare equal whatever order their keys were written in. */
export function canonicalJson(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonicalJson).join(',')}]`;
  if (v && typeof v === 'object')
    return `{${Object.keys(v)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonicalJson((v as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  return JSON.stringify(v);
}

const toStored = (r: Row): StoredSurveyRevision => ({
  id: Number(r['id']),
  siteId: Number(r['site_id']),
  version: Number(r['version']),
  state: r['state'] as SurveyRevisionState,
  baseSurvey: json(r['base_survey']),
  baseAlbedo: Number(r['base_albedo']),
  proposedSurvey: json(r['proposed_survey']),
  proposedAlbedo: Number(r['proposed_albedo']),
  fit: json(r['fit']),
  proposedAt: new Date(r['proposed_at'] as Date),
  proposedBy: person(r['proposed_by'], r['proposer_name']),
  decidedAt: r['decided_at'] ? new Date(r['decided_at'] as Date) : null,
  decidedBy: person(r['decided_by'], r['decider_name']),
  reason: (r['reason'] as string | null) ?? null,
  outcome: r['outcome'] === null || r['outcome'] === undefined ? null : json(r['outcome']),
});

/** Survey revisions of sites, and the scans and settled readings their fits are made from. */
export class SurveyRevisionRepository {
  constructor(private readonly db: Db) {}

  private base() {
    return this.db('survey_revisions as r')
      .leftJoin('users as p', 'p.id', 'r.proposed_by')
      .leftJoin('users as d', 'd.id', 'r.decided_by')
      .select('r.*', 'p.name as proposer_name', 'd.name as decider_name');
  }

  /** A site's revisions, newest first. */
  async list(siteId: number): Promise<StoredSurveyRevision[]> {
    return (await this.base().where('r.site_id', siteId).orderBy('r.version', 'desc')).map(toStored);
  }

  async get(siteId: number, id: number): Promise<StoredSurveyRevision | undefined> {
    const r = await this.base().where({ 'r.site_id': siteId, 'r.id': id }).first();
    return r ? toStored(r) : undefined;
  }

  /** Ids of a site's enabled units. */
  async unitIds(siteId: number): Promise<number[]> {
    return (await this.db('units').where({ site_id: siteId, disabled: false }).select('id')).map((r) => Number(r.id));
  }

  /** The latest complete scans of some units since an instant (newest first), with their samples. */
  async recentScans(unitIds: number[], since: Date, limit: number): Promise<StoredScan[]> {
    if (!unitIds.length) return [];
    const done: { unit_id: number; ts: Date; body: unknown }[] = await this.db('unit_events')
      .whereIn('unit_id', unitIds)
      .andWhere({ kind: 'scan-complete' })
      .andWhere('ts', '>=', since)
      .orderBy('ts', 'desc')
      .limit(limit)
      .select('unit_id', 'ts', 'body');
    const out: StoredScan[] = [];
    for (const d of done) {
      const commandId = json<{ commandId?: string }>(d.body).commandId;
      if (!commandId) continue;
      const rows: { ts: Date; body: unknown }[] = await this.db('unit_events')
        .where({ unit_id: d.unit_id, kind: 'scan-samples' })
        .andWhere('ts', '<=', d.ts)
        .whereRaw("JSON_UNQUOTE(JSON_EXTRACT(body, '$.commandId')) = ?", [commandId])
        .orderBy('ts')
        .select('ts', 'body');
      const reported = rows.map((r) => ({
        ts: new Date(r.ts).getTime(),
        samples: json<{ samples?: [number, number, number][] }>(r.body).samples ?? [],
      }));
      const samples = reported.flatMap((r) => r.samples);
      if (!samples.length) continue;
      out.push({ unitId: Number(d.unit_id), commandId, completedAt: new Date(d.ts), rows: reported, samples });
    }
    return out;
  }

  /** Each unit's settled report nearest to an instant within ±`windowMs`. */
  async settledNear(unitIds: number[], at: Date, windowMs: number): Promise<SettledReading[]> {
    if (!unitIds.length) return [];
    const rows: Row[] = await this.db('telemetry')
      .whereIn('unit_id', unitIds)
      .andWhere('mode', 'settled')
      .andWhere('ts', '>=', new Date(at.getTime() - windowMs))
      .andWhere('ts', '<=', new Date(at.getTime() + windowMs))
      .select('unit_id', 'ts', 'tilt_deg', 'azimuth_deg', 'poa_wm2');
    const best = new Map<number, SettledReading>();
    for (const r of rows) {
      const s: SettledReading = {
        unitId: Number(r['unit_id']),
        ts: new Date(r['ts'] as Date),
        tiltDeg: Number(r['tilt_deg']),
        azimuthDeg: Number(r['azimuth_deg']),
        poaWm2: Number(r['poa_wm2']),
      };
      const b = best.get(s.unitId);
      if (!b || Math.abs(s.ts.getTime() - at.getTime()) < Math.abs(b.ts.getTime() - at.getTime())) best.set(s.unitId, s);
    }
    return [...best.values()];
  }

  /**
   * Stores a proposal as the site's next version, in one transaction with its audit entry; a proposal still open for
   * the site becomes superseded (one open proposal per site).
   */
  async insertProposal(p: NewSurveyRevision): Promise<number> {
    return this.db.transaction(async (trx) => {
      await trx('sites').where({ id: p.siteId }).first('id').forUpdate();
      const latest = await trx('survey_revisions').where({ site_id: p.siteId }).max({ v: 'version' }).first();
      const version = Number(latest?.v ?? 0) + 1;
      await trx('survey_revisions').where({ site_id: p.siteId, state: 'proposed' }).update({ state: 'superseded' });
      const [id] = await trx('survey_revisions').insert({
        site_id: p.siteId,
        version,
        state: 'proposed',
        base_survey: JSON.stringify(p.baseSurvey),
        base_albedo: p.baseAlbedo,
        proposed_survey: JSON.stringify(p.proposedSurvey),
        proposed_albedo: p.proposedAlbedo,
        fit: JSON.stringify(p.fit),
        proposed_at: p.proposedAt,
        proposed_by: p.proposedBy,
      });
      await appendAudit(trx, {
        userId: p.proposedBy,
        action: 'survey-revision-propose',
        target: `site:${p.siteId}`,
        detail: { revisionId: id, version, ...p.audit },
      });
      return Number(id);
    });
  }

  /** Rejects an open proposal with a reason (audited in the same transaction). */
  async reject(siteId: number, id: number, by: number, reason: string, at: Date): Promise<DecideOutcome> {
    return this.db.transaction(async (trx) => {
      const r = await trx('survey_revisions').where({ id, site_id: siteId }).first('state', 'version').forUpdate();
      if (!r) return 'not-found';
      if (r.state !== 'proposed') return 'not-proposed';
      await trx('survey_revisions').where({ id }).update({ state: 'rejected', decided_at: at, decided_by: by, reason });
      await appendAudit(trx, {
        userId: by,
        action: 'survey-revision-reject',
        target: `site:${siteId}`,
        detail: { revisionId: id, version: r.version, reason },
      });
      return 'done';
    });
  }

  /**
   * Accepts an open proposal: in one transaction, checks that the site still has the survey and albedo the fit started
   * from (otherwise the proposal is superseded and nothing else changes), makes the proposed ones the site's, marks the
   * revision accepted and writes the audit entries (the acceptance, and the survey update as a manual save writes it).
   */
  async accept(siteId: number, id: number, by: number, reason: string, at: Date, audit: Record<string, unknown>): Promise<DecideOutcome> {
    return this.db.transaction(async (trx: Knex.Transaction) => {
      const r = await trx('survey_revisions').where({ id, site_id: siteId }).first().forUpdate();
      if (!r) return 'not-found';
      if (r.state !== 'proposed') return 'not-proposed';
      const site = await trx('sites').where({ id: siteId }).first('survey', 'albedo').forUpdate();
      const current = site?.survey === null || site?.survey === undefined ? null : json(site.survey);
      const base = json<SiteSurvey>(r.base_survey);
      const emptyBase = base.horizon.length + base.reflectors.length + base.lamps.length === 0 && base.skyType === 'isotropic';
      const same =
        (current === null ? emptyBase : canonicalJson(current) === canonicalJson(base)) &&
        Math.abs(Number(site.albedo) - Number(r.base_albedo)) < 1e-9;
      if (!same) {
        await trx('survey_revisions').where({ id }).update({ state: 'superseded' });
        return 'survey-changed';
      }
      const survey = json<SiteSurvey>(r.proposed_survey);
      await trx('sites')
        .where({ id: siteId })
        .update({ survey: JSON.stringify(survey), albedo: r.proposed_albedo });
      await trx('survey_revisions').where({ id }).update({ state: 'accepted', decided_at: at, decided_by: by, reason });
      await appendAudit(trx, {
        userId: by,
        action: 'survey-revision-accept',
        target: `site:${siteId}`,
        detail: { revisionId: id, version: r.version, reason, ...audit },
      });
      await appendAudit(trx, {
        userId: by,
        action: 'site-survey-update',
        target: `site:${siteId}`,
        detail: {
          horizonPoints: survey.horizon.length,
          reflectors: survey.reflectors.length,
          lamps: survey.lamps.length,
          albedo: Number(r.proposed_albedo),
          surveyRevisionId: id,
        },
      });
      return 'done';
    });
  }

  /** Records what accepting did (after the fact: trap alarms are re-evaluated once the new survey is in force). */
  async setOutcome(id: number, outcome: unknown): Promise<void> {
    await this.db('survey_revisions')
      .where({ id })
      .update({ outcome: JSON.stringify(outcome) });
  }
}
