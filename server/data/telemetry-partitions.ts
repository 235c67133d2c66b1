import type { Db } from './db';

/** One partition of the raw telemetry table: rows with `fromMs ≤ ts < toMs` (null: unbounded on that side). */
export interface RawPartition {
  name: string;
  fromMs: number | null;
  toMs: number | null;
}

const MONTH_NAME = /^p\d{6}$/;
const monthStart = (ms: number, add = 0) => {
  const d = new Date(ms);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + add, 1);
};
const bound = (ms: number) => `'${new Date(ms).toISOString().slice(0, 10)} 00:00:00'`;
const nameOf = (ms: number) => {
  const iso = new Date(ms).toISOString();
  return `p${iso.slice(0, 4)}${iso.slice(5, 7)}`;
};

/**
 * The monthly partitions of `telemetry` (RANGE COLUMNS on `ts`, made by migration 20261209110000): `p_before` holds
 * anything older than the first month, `pYYYYMM` one calendar month (UTC), `p_future` anything past the last month.
 * Months are added ahead by splitting `p_future`; retention drops whole months.
 */
export class TelemetryPartitions {
  constructor(private readonly db: Db) {}

  async list(): Promise<RawPartition[]> {
    const [rows] = (await this.db.raw(
      `SELECT PARTITION_NAME AS name, PARTITION_DESCRIPTION AS upper FROM information_schema.PARTITIONS
       WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'telemetry' ORDER BY PARTITION_ORDINAL_POSITION`,
    )) as unknown as [{ name: string | null; upper: string | null }[]];
    if (!rows.length || rows[0]!.name === null)
      throw new Error('telemetry is not partitioned by month: apply migration 20261209110000_partition_telemetry_by_month');
    let fromMs: number | null = null;
    return rows.map((r) => {
      const toMs = r.upper === null || r.upper === 'MAXVALUE' ? null : Date.parse(`${r.upper.replace(/'/g, '').replace(' ', 'T')}Z`);
      const p = { name: r.name!, fromMs, toMs };
      fromMs = toMs;
      return p;
    });
  }

  /** Adds the months up to the one holding `untilMs`, split off `p_future` (rows already there move to their month). */
  async ensureAhead(untilMs: number): Promise<string[]> {
    const parts = await this.list();
    const future = parts.at(-1);
    if (!future || future.toMs !== null || future.fromMs === null) throw new Error('telemetry has no catch-all partition p_future');
    const add: string[] = [];
    for (let m = future.fromMs; m <= monthStart(untilMs); m = monthStart(m, 1))
      add.push(`PARTITION ${nameOf(m)} VALUES LESS THAN (${bound(monthStart(m, 1))})`);
    if (!add.length) return [];
    await this.db.raw(
      `ALTER TABLE telemetry REORGANIZE PARTITION ${future.name} INTO (${add.join(', ')}, PARTITION ${future.name} VALUES LESS THAN (MAXVALUE))`,
    );
    return add.map((a) => a.split(' ')[1]!);
  }

  /**
   * Drops every month that ends at or before `cutoff` (whole partitions, no row-by-row delete), and deletes the rows
   * older than `cutoff` from `p_before` (rows dated before the first month: few, if any). A month that is only partly
   * past the cutoff stays whole until it is all past it.
   */
  async dropBefore(cutoff: Date, chunk = 50_000): Promise<{ dropped: string[]; strayRows: number }> {
    const parts = await this.list();
    const dropped = parts.filter((p) => MONTH_NAME.test(p.name) && p.toMs !== null && p.toMs <= cutoff.getTime()).map((p) => p.name);
    if (dropped.length) await this.db.raw(`ALTER TABLE telemetry DROP PARTITION ${dropped.join(', ')}`);
    let strayRows = 0;
    if (parts[0]?.name === 'p_before')
      for (;;) {
        const [res] = (await this.db.raw('DELETE FROM telemetry PARTITION (p_before) WHERE ts < ? LIMIT ?', [
          cutoff,
          chunk,
        ])) as unknown as [{ affectedRows: number }];
        strayRows += res.affectedRows;
        if (res.affectedRows < chunk) break;
      }
    return { dropped, strayRows };
  }
}
