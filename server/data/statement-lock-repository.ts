import type { Db } from './db';

/** One stored version of a site's locked month. */
export interface StoredStatement {
  id: number;
  siteId: number;
  month: string;
  version: number;
  state: 'locked' | 'superseded';
  content: string;
  checksum: string;
  lockedAt: Date;
  lockedBy: number | null;
  lockedByName: string | null;
  reason: string | null;
  silent: boolean;
  restatementSuggestedAt: Date | null;
}

export interface NewStatementVersion {
  siteId: number;
  month: string;
  content: string;
  checksum: string;
  lockedAt: Date;
  lockedBy: number | null;
  reason: string | null;
  silent: boolean;
}

/** Thrown when another process locked the same month first (the unique site, month, version). */
export class StatementLockRace extends Error {}

const COLUMNS = [
  's.id',
  's.site_id',
  's.month',
  's.version',
  's.state',
  's.content',
  's.checksum',
  's.locked_at',
  's.locked_by',
  'u.name as locked_by_name',
  's.reason',
  's.silent',
  's.restatement_suggested_at',
];

type Row = Record<string, unknown>;
const toStored = (r: Row): StoredStatement => ({
  id: r['id'] as number,
  siteId: r['site_id'] as number,
  month: r['month'] as string,
  version: r['version'] as number,
  state: r['state'] as StoredStatement['state'],
  content: r['content'] as string,
  checksum: r['checksum'] as string,
  lockedAt: new Date(r['locked_at'] as Date),
  lockedBy: (r['locked_by'] as number | null) ?? null,
  lockedByName: (r['locked_by_name'] as string | null) ?? null,
  reason: (r['reason'] as string | null) ?? null,
  silent: Boolean(r['silent']),
  restatementSuggestedAt: r['restatement_suggested_at'] ? new Date(r['restatement_suggested_at'] as Date) : null,
});

/** Locked statements: every version of every site's locked months. */
export class StatementLockRepository {
  constructor(private readonly db: Db) {}

  private base() {
    return this.db('statements as s').leftJoin('users as u', 'u.id', 's.locked_by');
  }

  /** Versions of a month without their content, newest first. */
  async versions(siteId: number, month: string): Promise<Omit<StoredStatement, 'content'>[]> {
    const rows = await this.base()
      .where({ 's.site_id': siteId, 's.month': month })
      .orderBy('s.version', 'desc')
      .select(COLUMNS.filter((c) => c !== 's.content'));
    return rows.map((r: Row) => toStored({ ...r, content: '' }));
  }

  /** One version (null: the one in force), or undefined when there is none. */
  async get(siteId: number, month: string, version: number | null): Promise<StoredStatement | undefined> {
    const q = this.base().where({ 's.site_id': siteId, 's.month': month });
    if (version === null) q.andWhere('s.state', 'locked');
    else q.andWhere('s.version', version);
    const r = await q.first(COLUMNS);
    return r ? toStored(r) : undefined;
  }

  /** Months of a site with a locked version: month → restatement suggested. */
  async lockedMonths(siteId?: number): Promise<{ siteId: number; month: string; version: number; suggested: boolean }[]> {
    const q = this.db('statements').where({ state: 'locked' });
    if (siteId !== undefined) q.andWhere({ site_id: siteId });
    const rows = await q.select('site_id', 'month', 'version', 'restatement_suggested_at');
    return rows.map((r) => ({ siteId: r.site_id, month: r.month, version: r.version, suggested: r.restatement_suggested_at !== null }));
  }

  /**
   * Stores the next version of a month in one transaction: the one in force (if any) becomes superseded. `expected`
   * is the version the caller saw in force (0 = none); another lock or restatement in between answers StatementLockRace.
   */
  async insertVersion(v: NewStatementVersion, expected: number): Promise<number> {
    try {
      return await this.db.transaction(async (trx) => {
        const current = await trx('statements').where({ site_id: v.siteId, month: v.month }).max({ v: 'version' }).first().forUpdate();
        const latest = Number(current?.v ?? 0);
        if (latest !== expected) throw new StatementLockRace(`version ${latest} is in force, not ${expected}`);
        if (latest) await trx('statements').where({ site_id: v.siteId, month: v.month, version: latest }).update({ state: 'superseded' });
        await trx('statements').insert({
          site_id: v.siteId,
          month: v.month,
          version: latest + 1,
          state: 'locked',
          content: v.content,
          checksum: v.checksum,
          locked_at: v.lockedAt,
          locked_by: v.lockedBy,
          reason: v.reason,
          silent: v.silent,
        });
        return latest + 1;
      });
    } catch (err) {
      if ((err as { code?: string }).code === 'ER_DUP_ENTRY') throw new StatementLockRace('the month was locked meanwhile');
      throw err;
    }
  }

  /** Marks the version in force of a month "restatement suggested" (once; the first time counts). */
  async markSuggested(siteId: number, month: string, at: Date): Promise<boolean> {
    const n = await this.db('statements')
      .where({ site_id: siteId, month, state: 'locked' })
      .whereNull('restatement_suggested_at')
      .update({ restatement_suggested_at: at });
    return n > 0;
  }

  /** Sites with their zone and the first bucket of their data (null without data), for the lock job. */
  async sitesWithData(): Promise<{ siteId: number; timeZone: string; firstMs: number | null }[]> {
    const rows = await this.db('sites as s')
      .leftJoin('units as un', 'un.site_id', 's.id')
      .leftJoin(
        this.db('telemetry_15m').groupBy('unit_id').select('unit_id', this.db.raw('MIN(bucket) AS first')).as('q'),
        'q.unit_id',
        'un.id',
      )
      .groupBy('s.id', 's.time_zone')
      .select('s.id', 's.time_zone', this.db.raw('MIN(q.first) AS first'));
    return rows.map((r: Row) => ({
      siteId: r['id'] as number,
      timeZone: r['time_zone'] as string,
      firstMs: r['first'] ? new Date(r['first'] as Date).getTime() : null,
    }));
  }

  /** The owner's contact addresses of a site (comma- or semicolon-separated in `owners.contact_email`). */
  async ownerContacts(siteId: number): Promise<string[]> {
    const r = await this.db('sites as s').join('owners as o', 'o.id', 's.owner_id').where('s.id', siteId).first('o.contact_email');
    return String(r?.contact_email ?? '')
      .split(/[,;]/)
      .map((a) => a.trim())
      .filter(Boolean);
  }
}
