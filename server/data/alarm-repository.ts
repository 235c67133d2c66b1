import type { Db } from './db';
import type { SiteScope } from './site-repository';
import { appendAudit, type AuditEntry } from './audit-repository';

export interface AlarmRow {
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

export interface AlarmFilter {
  siteId?: number;
  unitId?: number;
  state?: 'active' | 'cleared';
  limit?: number;
}

export type AlarmListRow = AlarmRow & { serial: string | null; site_name: string; acknowledged_by_name: string | null };

/** Alarms and per-site health settings. Owner scoping joins through the site. */
export class AlarmRepository {
  constructor(private readonly db: Db) {}

  async insert(row: Omit<AlarmRow, 'id'>): Promise<number> {
    const [id] = await this.db('alarms').insert(row);
    return id!;
  }

  async update(id: number, patch: Partial<Omit<AlarmRow, 'id'>>): Promise<void> {
    await this.db('alarms').where({ id }).update(patch);
  }

  /** The active alarm of a unit (or a site, unitId null) and kind, if any (dedupe across restarts). */
  async findActive(siteId: number, unitId: number | null, kind: string): Promise<AlarmRow | undefined> {
    const q = this.db('alarms').where({ site_id: siteId, kind, state: 'active' });
    return (unitId === null ? q.whereNull('unit_id') : q.where('unit_id', unitId)).orderBy('id', 'desc').first();
  }

  async list(scope: SiteScope, f: AlarmFilter): Promise<AlarmListRow[]> {
    const q = this.base(scope).orderBy('a.raised_at', 'desc').limit(f.limit ?? 500);
    if (f.siteId !== undefined) q.where('a.site_id', f.siteId);
    if (f.unitId !== undefined) q.where('a.unit_id', f.unitId);
    if (f.state) q.where('a.state', f.state);
    return q;
  }

  async get(id: number, scope: SiteScope): Promise<AlarmListRow | undefined> {
    return this.base(scope).where('a.id', id).first();
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

  async settings(siteId: number): Promise<Record<string, number> | null> {
    const r = await this.db('site_health_settings').where({ site_id: siteId }).first('settings');
    if (!r) return null;
    return typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings;
  }

  async allSettings(): Promise<Map<number, Record<string, number>>> {
    const rows = await this.db('site_health_settings').select('site_id', 'settings');
    return new Map(rows.map((r) => [r.site_id as number, typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings]));
  }

  /**
   * Replaces a site's overrides and writes the audit entry in the same transaction; `audit` is given the overrides
   * being replaced (read under a row lock, so two saves at once each see what they replace).
   */
  async saveSettings(siteId: number, settings: Record<string, number>, userId: number, at: Date, audit: (before: Record<string, number> | null) => Omit<AuditEntry, 'userId'>): Promise<void> {
    await this.db.transaction(async (trx) => {
      // Lock the site's row (it always exists): locking a settings row that is not there yet takes a gap lock, and two
      // first saves of one site at once would then deadlock on their inserts.
      await trx('sites').where({ id: siteId }).forUpdate().first('id');
      const r = await trx('site_health_settings').where({ site_id: siteId }).first('settings');
      const before = r ? (typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings) : null;
      await trx('site_health_settings')
        .insert({ site_id: siteId, settings: JSON.stringify(settings), updated_by: userId, updated_at: at })
        .onConflict('site_id')
        .merge();
      await appendAudit(trx, { ...audit(before), userId });
    });
  }

  /** Events of a scan: the `scan-samples` chunks and the `scan-complete` of the unit's latest (or a given) scan. */
  async scanEvents(unitId: number, commandId?: string): Promise<{ ts: Date; kind: string; body: string | Record<string, unknown> }[]> {
    let id = commandId;
    if (!id) {
      const last = await this.db('unit_events').where({ unit_id: unitId, kind: 'scan-complete' }).orderBy('ts', 'desc').first('body');
      if (!last) return [];
      const body = typeof last.body === 'string' ? JSON.parse(last.body) : last.body;
      id = body.commandId;
      if (!id) return [];
    }
    return this.db('unit_events')
      .where({ unit_id: unitId })
      .whereIn('kind', ['scan-samples', 'scan-complete'])
      .whereRaw("JSON_UNQUOTE(JSON_EXTRACT(body, '$.commandId')) = ?", [id])
      .orderBy('ts')
      .select('ts', 'kind', 'body');
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

/** Readings the health service needs from tables other services own (read-only). */
export class HealthReadRepository {
  constructor(private readonly db: Db) {}

  /** Weather readings stored after `afterMs`, oldest first. */
  async weatherSince(afterMs: number, limit = 5000): Promise<{ site_id: number; ts: Date; ghi_wm2: number; dhi_wm2: number | null; air_temp_c: number; wind_ms: number; gust_ms: number }[]> {
    return this.db('weather').where('ts', '>', new Date(afterMs)).orderBy('ts').limit(limit);
  }

  async siteIndoor(siteId: number): Promise<boolean> {
    const r = await this.db('sites').where({ id: siteId }).first('indoor');
    return Boolean(r?.indoor);
  }

  /** In-plane irradiance of the unit's last report before an instant that was not part of a scan. */
  async poaBefore(unitId: number, before: Date): Promise<number | null> {
    const r = await this.db('telemetry').where('unit_id', unitId).andWhere('ts', '<', before).whereNot('mode', 'scanning').orderBy('ts', 'desc').first('poa_wm2');
    return r ? Number(r.poa_wm2) : null;
  }

  /** Raw telemetry of some units over a range, in time order (on-demand runs). */
  async telemetryRange(unitIds: number[], from: Date, to: Date, limit: number): Promise<Record<string, unknown>[]> {
    return this.db('telemetry').whereIn('unit_id', unitIds).andWhere('ts', '>=', from).andWhere('ts', '<', to).orderBy('ts').limit(limit);
  }
}
