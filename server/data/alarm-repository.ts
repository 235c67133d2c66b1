import type { AlarmView } from '../../shared/contracts/alarms';
import type { Alarm } from '../health/alarm-types';
import type { Db } from './db';
import type { SiteScope } from './site-repository';
import { appendAudit, type AuditEntry } from './audit-repository';

interface AlarmRow {
  id: number;
  unit_id: number | null;
  site_id: number;
  kind: string;
  severity: string;
  state: string;
  message: string;
  advice: string;
  /** JSON text when written; the driver may hand it back parsed. */
  evidence: string | Record<string, unknown>;
  first_seen_at: Date;
  raised_at: Date;
  last_seen_at: Date;
  cleared_at: Date | null;
  clear_reason: string | null;
  acknowledged_at: Date | null;
  acknowledged_by: number | null;
}

type AlarmListRow = AlarmRow & { serial: string | null; site_name: string; acknowledged_by_name: string | null };

export interface AlarmFilter {
  siteId?: number;
  unitId?: number;
  state?: 'active' | 'cleared';
  limit?: number;
}

/** What changes while an alarm stays open. */
export type AlarmSeen = Pick<Alarm, 'severity' | 'message' | 'advice' | 'evidence' | 'lastSeenMs'>;
/** What changes when an alarm clears. */
export type AlarmClear = Pick<Alarm, 'clearedMs' | 'clearReason' | 'lastSeenMs'>;

/** Stored alarms. Owner scoping joins through the site. */
export class AlarmRepository {
  constructor(private readonly db: Db) {}

  async insert(a: Alarm): Promise<number> {
    const [id] = await this.db('alarms').insert(rowOf(a));
    return id!;
  }

  /** Rewrites an open alarm from the engine's record, keeping when it was first seen and raised. */
  async restate(id: number, a: Alarm): Promise<void> {
    const { first_seen_at: _first, raised_at: _raised, ...row } = rowOf(a);
    await this.db('alarms').where({ id }).update(row);
  }

  async markSeen(id: number, s: AlarmSeen): Promise<void> {
    await this.db('alarms')
      .where({ id })
      .update({
        severity: s.severity,
        message: s.message.slice(0, 600),
        advice: s.advice.slice(0, 600),
        evidence: JSON.stringify(s.evidence),
        last_seen_at: new Date(s.lastSeenMs),
      });
  }

  async markCleared(id: number, c: AlarmClear): Promise<void> {
    await this.db('alarms')
      .where({ id })
      .update({
        state: 'cleared',
        cleared_at: c.clearedMs === null ? null : new Date(c.clearedMs),
        clear_reason: c.clearReason,
        last_seen_at: new Date(c.lastSeenMs),
      });
  }

  /** The id of the active alarm of a unit (or a site, unitId null) and kind, if any (dedupe across restarts). */
  async findActive(siteId: number, unitId: number | null, kind: string): Promise<number | undefined> {
    const q = this.db('alarms').where({ site_id: siteId, kind, state: 'active' });
    const row = await (unitId === null ? q.whereNull('unit_id') : q.where('unit_id', unitId)).orderBy('id', 'desc').first('id');
    return row?.id;
  }

  async list(scope: SiteScope, f: AlarmFilter): Promise<AlarmView[]> {
    const q = this.base(scope)
      .orderBy('a.raised_at', 'desc')
      .limit(f.limit ?? 500);
    if (f.siteId !== undefined) q.where('a.site_id', f.siteId);
    if (f.unitId !== undefined) q.where('a.unit_id', f.unitId);
    if (f.state) q.where('a.state', f.state);
    return ((await q) as AlarmListRow[]).map(toView);
  }

  /**
   * Alarms that were raised before `to` and not cleared before `from` (open at some time in the range): the units'
   * own and, for the given sites, the site-wide ones (a dark site). Oldest first, at most `limit`.
   */
  async overlapping(
    scope: SiteScope,
    f: { unitIds: number[]; siteIds: number[]; from: Date; to: Date; limit: number },
  ): Promise<AlarmView[]> {
    if (!f.unitIds.length && !f.siteIds.length) return [];
    const q = this.base(scope)
      .where('a.raised_at', '<', f.to)
      .where((w) => w.whereNull('a.cleared_at').orWhere('a.cleared_at', '>=', f.from))
      .where((w) => {
        if (f.unitIds.length) w.whereIn('a.unit_id', f.unitIds);
        if (f.siteIds.length) w.orWhere((x) => x.whereNull('a.unit_id').whereIn('a.site_id', f.siteIds));
      })
      .orderBy([
        { column: 'a.raised_at', order: 'asc' },
        { column: 'a.id', order: 'asc' },
      ])
      .limit(f.limit);
    return ((await q) as AlarmListRow[]).map(toView);
  }

  async get(id: number, scope: SiteScope): Promise<AlarmView | undefined> {
    const row = (await this.base(scope).where('a.id', id).first()) as AlarmListRow | undefined;
    return row ? toView(row) : undefined;
  }

  /**
   * Acknowledges an alarm not acknowledged yet, and writes the audit entry in the same transaction. Returns whether it
   * took effect (acknowledging twice changes nothing and records nothing).
   */
  async acknowledge(id: number, userId: number, at: Date, audit: Omit<AuditEntry, 'userId'>): Promise<boolean> {
    return this.db.transaction(async (trx) => {
      const n = await trx('alarms').where({ id }).whereNull('acknowledged_at').update({ acknowledged_at: at, acknowledged_by: userId });
      if (n > 0) await appendAudit(trx, { ...audit, userId });
      return n > 0;
    });
  }

  private base(scope: SiteScope) {
    const q = this.db('alarms as a')
      .join('sites as s', 's.id', 'a.site_id')
      .leftJoin('units as u', 'u.id', 'a.unit_id')
      .leftJoin('users as k', 'k.id', 'a.acknowledged_by')
      .select('a.*', 'u.serial', 's.name as site_name', 'k.name as acknowledged_by_name');
    if (scope.ownerId !== null) q.where('s.owner_id', scope.ownerId);
    return q;
  }
}

function rowOf(a: Alarm): Omit<AlarmRow, 'id'> {
  return {
    unit_id: a.unitId,
    site_id: a.siteId,
    kind: a.kind,
    severity: a.severity,
    state: a.state,
    message: a.message.slice(0, 600),
    advice: a.advice.slice(0, 600),
    evidence: JSON.stringify(a.evidence),
    first_seen_at: new Date(a.firstSeenMs),
    raised_at: new Date(a.raisedMs),
    last_seen_at: new Date(a.lastSeenMs),
    cleared_at: a.clearedMs === null ? null : new Date(a.clearedMs),
    clear_reason: a.clearReason,
    acknowledged_at: null,
    acknowledged_by: null,
  };
}

function toView(r: AlarmListRow): AlarmView {
  const d = (x: Date | null) => (x === null ? null : new Date(x).toISOString());
  return {
    id: r.id,
    kind: r.kind,
    severity: r.severity,
    state: r.state,
    unitId: r.unit_id,
    serial: r.serial,
    siteId: r.site_id,
    siteName: r.site_name,
    message: r.message,
    advice: r.advice,
    evidence: typeof r.evidence === 'string' ? JSON.parse(r.evidence) : r.evidence,
    firstSeenAt: d(r.first_seen_at)!,
    raisedAt: d(r.raised_at)!,
    lastSeenAt: d(r.last_seen_at)!,
    clearedAt: d(r.cleared_at),
    clearReason: r.clear_reason,
    acknowledgedAt: d(r.acknowledged_at),
    acknowledgedBy: r.acknowledged_by_name,
  };
}
