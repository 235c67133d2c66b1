import type { Knex } from 'knex';
import type { Db } from './db';

export interface AuditEntry {
  userId: number | null;
  action: string;
  target?: string;
  detail?: unknown;
}

export interface AuditFilter {
  action?: string;
  userId?: number;
  target?: string;
  from?: Date;
  to?: Date;
}

/** A stored entry with the name and e-mail of whoever took the action (null when that person no longer exists). */
export interface StoredAuditEntry {
  id: number;
  at: Date;
  userId: number | null;
  action: string;
  target: string | null;
  detail: unknown;
  userName: string | null;
  userEmail: string | null;
}

interface AuditListRow {
  id: number | string;
  at: Date;
  user_id: number | null;
  action: string;
  target: string | null;
  detail: string | Record<string, unknown> | null;
  user_name: string | null;
  user_email: string | null;
}

/** Names of the things audit targets point at, by kind and id (`unit` → serial, `site` → name, …). */
export interface TargetNames {
  units: Map<number, string>;
  sites: Map<number, string>;
  owners: Map<number, string>;
  users: Map<number, string>;
  alarms: Map<number, { kind: string; serial: string | null; siteName: string }>;
}

/** The row of one entry; also used by repositories that write an entry in the same transaction as the change. */
export const auditRow = (e: AuditEntry) => ({
  user_id: e.userId,
  action: e.action,
  target: e.target ?? null,
  detail: e.detail === undefined ? null : JSON.stringify(e.detail),
});

/** Appends an entry inside a transaction another repository opened (the change and its entry commit together). */
export async function appendAudit(trx: Knex.Transaction, e: AuditEntry): Promise<void> {
  await trx('audit_log').insert(auditRow(e));
}

export class AuditRepository {
  constructor(private readonly db: Db) {}

  async append(e: AuditEntry): Promise<void> {
    await this.db('audit_log').insert(auditRow(e));
  }

  /** Entries matching the filter, newest first, and how many match in all. `to` is exclusive. */
  async list(f: AuditFilter, limit: number, offset: number): Promise<{ total: number; rows: StoredAuditEntry[] }> {
    const filtered = () => {
      const q = this.db('audit_log as a');
      if (f.action !== undefined) q.where('a.action', f.action);
      if (f.userId !== undefined) q.where('a.user_id', f.userId);
      if (f.target !== undefined) q.where('a.target', f.target);
      if (f.from !== undefined) q.where('a.at', '>=', f.from);
      if (f.to !== undefined) q.where('a.at', '<', f.to);
      return q;
    };
    const [count, rows] = await Promise.all([
      filtered().count({ n: '*' }).first(),
      filtered()
        .leftJoin('users as u', 'u.id', 'a.user_id')
        .select('a.id', 'a.at', 'a.user_id', 'a.action', 'a.target', 'a.detail', 'u.name as user_name', 'u.email as user_email')
        .orderBy([
          { column: 'a.at', order: 'desc' },
          { column: 'a.id', order: 'desc' },
        ])
        .limit(limit)
        .offset(offset),
    ]);
    return {
      total: Number((count as { n: number | string } | undefined)?.n ?? 0),
      rows: (rows as AuditListRow[]).map((r) => ({
        id: Number(r.id),
        at: new Date(r.at),
        userId: r.user_id,
        action: r.action,
        target: r.target,
        detail: typeof r.detail === 'string' ? JSON.parse(r.detail) : r.detail,
        userName: r.user_name,
        userEmail: r.user_email,
      })),
    };
  }

  /** The names behind the given target ids (ids that no longer exist are simply absent). */
  async targetNames(ids: { units: number[]; sites: number[]; owners: number[]; users: number[]; alarms: number[] }): Promise<TargetNames> {
    const pick = async <T>(ids: number[], query: (ids: number[]) => Promise<T[]>) => (ids.length ? query(ids) : []);
    const [units, sites, owners, users, alarms] = await Promise.all([
      pick(ids.units, (x) => this.db('units').whereIn('id', x).select('id', 'serial as name')),
      pick(ids.sites, (x) => this.db('sites').whereIn('id', x).select('id', 'name')),
      pick(ids.owners, (x) => this.db('owners').whereIn('id', x).select('id', 'name')),
      pick(ids.users, (x) => this.db('users').whereIn('id', x).select('id', 'name')),
      pick(ids.alarms, (x) =>
        this.db('alarms as a')
          .join('sites as s', 's.id', 'a.site_id')
          .leftJoin('units as u', 'u.id', 'a.unit_id')
          .whereIn('a.id', x)
          .select('a.id', 'a.kind', 'u.serial', 's.name as site_name'),
      ),
    ]);
    const byId = (rows: { id: number; name: string }[]) => new Map(rows.map((r) => [r.id, r.name]));
    return {
      units: byId(units),
      sites: byId(sites),
      owners: byId(owners),
      users: byId(users),
      alarms: new Map(
        (alarms as { id: number; kind: string; serial: string | null; site_name: string }[]).map((a) => [
          a.id,
          { kind: a.kind, serial: a.serial, siteName: a.site_name },
        ]),
      ),
    };
  }
}
