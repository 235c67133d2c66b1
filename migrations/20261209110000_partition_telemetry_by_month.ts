import type { Knex } from 'knex';

/**
 * Raw telemetry partitioned by calendar month (UTC) on `ts`, so retention drops a whole month at once instead of
 * deleting rows one by one (server/data/telemetry-partitions.ts keeps months ahead and drops the old ones). The primary
 * key (unit_id, ts) contains the partition column, as MariaDB requires of every unique key. Partitions: `p_before`
 * (anything older than the first month), one `pYYYYMM` per month, and `p_future` (MAXVALUE), so a row of any time is
 * stored. The first month is the oldest stored row's, at least 13 months back and at most 5 years; three months ahead
 * of the current one are made now. One ALTER (rebuilds the table once).
 */
const monthStart = (y: number, m: number) => new Date(Date.UTC(y, m, 1));
const bound = (d: Date) => `'${d.toISOString().slice(0, 10)} 00:00:00'`;
const name = (d: Date) => `p${d.toISOString().slice(0, 4)}${d.toISOString().slice(5, 7)}`;

export async function up(knex: Knex): Promise<void> {
  const now = new Date();
  const [rows] = (await knex.raw('SELECT MIN(ts) AS oldest FROM telemetry')) as unknown as [{ oldest: Date | null }[]];
  const floor = monthStart(now.getUTCFullYear() - 5, now.getUTCMonth());
  let first = monthStart(now.getUTCFullYear(), now.getUTCMonth() - 13);
  const oldest = rows[0]?.oldest;
  if (oldest && oldest < first) first = monthStart(oldest.getUTCFullYear(), oldest.getUTCMonth());
  if (first < floor) first = floor;
  const last = monthStart(now.getUTCFullYear(), now.getUTCMonth() + 3);
  const parts = [`PARTITION p_before VALUES LESS THAN (${bound(first)})`];
  for (let d = first; d <= last; d = monthStart(d.getUTCFullYear(), d.getUTCMonth() + 1))
    parts.push(`PARTITION ${name(d)} VALUES LESS THAN (${bound(monthStart(d.getUTCFullYear(), d.getUTCMonth() + 1))})`);
  parts.push('PARTITION p_future VALUES LESS THAN (MAXVALUE)');
  await knex.raw(`ALTER TABLE telemetry PARTITION BY RANGE COLUMNS(ts) (${parts.join(', ')})`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE telemetry REMOVE PARTITIONING');
}
