import type { AvailabilityCategory } from '../../shared/contracts/tickets';
import type { Db } from './db';

/** Length of one rollup bucket [ms]. */
export const QUARTER_MS = 15 * 60_000;

/**
 * A month of 15-minute rows of some units, column by column (no object per row: a 100-unit month is ≈ 290,000 rows).
 * Element `slot × buckets + k` is unit `unitIds[slot]` in bucket k (k = (bucket − fromMs) ÷ 15 min); NaN = no row, or a
 * NULL column (older rows lack the statement columns).
 */
export interface StatementColumns {
  fromMs: number;
  /** Buckets per unit: ⌈(toMs − fromMs) ÷ 15 min⌉. */
  buckets: number;
  unitIds: readonly number[];
  /** Rows read. */
  rows: number;
  /** Minutes reported; NaN where the unit has no row. */
  minutes: Float64Array;
  poaAvgWm2: Float64Array;
  energyWh: Float64Array;
  moduleTempC: Float64Array;
  settledMin: Float64Array;
  stowedMin: Float64Array;
  heldMin: Float64Array;
  faultMin: Float64Array;
  modelUnitWm2: Float64Array;
  modelBestWm2: Float64Array;
  modelFixedWm2: Float64Array;
  modelSunWm2: Float64Array;
}

/** Column order of the read, after unit id and bucket. */
const COLUMN_KEYS = [
  'minutes',
  'poaAvgWm2',
  'energyWh',
  'moduleTempC',
  'settledMin',
  'stowedMin',
  'heldMin',
  'faultMin',
  'modelUnitWm2',
  'modelBestWm2',
  'modelFixedWm2',
  'modelSunWm2',
] as const satisfies readonly (keyof StatementColumns)[];

/** Empty columns (every element NaN) for `unitIds` over [fromMs, toMs). */
export function emptyStatementColumns(unitIds: readonly number[], fromMs: number, toMs: number): StatementColumns {
  const buckets = Math.max(0, Math.ceil((toMs - fromMs) / QUARTER_MS));
  const n = unitIds.length * buckets;
  const col = () => new Float64Array(n).fill(NaN);
  return {
    fromMs,
    buckets,
    unitIds,
    rows: 0,
    minutes: col(),
    poaAvgWm2: col(),
    energyWh: col(),
    moduleTempC: col(),
    settledMin: col(),
    stowedMin: col(),
    heldMin: col(),
    faultMin: col(),
    modelUnitWm2: col(),
    modelBestWm2: col(),
    modelFixedWm2: col(),
    modelSunWm2: col(),
  };
}

export interface StatementUnit {
  id: number;
  serial: string;
  ratedPowerWp: number;
}

/** A ticket's downtime interval (end null: still open). Unit null: the whole site. */
export interface StatementTicket {
  id: number;
  unitId: number | null;
  category: AvailabilityCategory;
  fromMs: number;
  toMs: number | null;
  openedMs: number;
  closedMs: number | null;
}

/** An alarm interval of a unit (end null: still active). */
export interface StatementAlarm {
  unitId: number;
  kind: string;
  fromMs: number;
  toMs: number | null;
}

/** The driver connection under Knex (mysql2), for a prepared statement. */
interface PreparedConnection {
  execute(q: { sql: string; rowsAsArray: boolean }, values: unknown[], cb: (err: Error | null, rows: unknown) => void): void;
}

/** What a site's monthly statement is computed from: units, 15-minute rollups, tickets and alarms. */
export class StatementRepository {
  constructor(private readonly db: Db) {}

  units(siteId: number): Promise<StatementUnit[]> {
    return this.db('units').where({ site_id: siteId }).orderBy('serial').select('id', 'serial', { ratedPowerWp: 'rated_power_wp' });
  }

  /** First and last 15-minute bucket of a site's units, or null without data. */
  async span(siteId: number): Promise<{ firstMs: number; lastMs: number } | null> {
    const row = await this.db('telemetry_15m as q')
      .join('units as u', 'u.id', 'q.unit_id')
      .where('u.site_id', siteId)
      .first(this.db.raw('MIN(q.bucket) AS first'), this.db.raw('MAX(q.bucket) AS last'));
    return row?.first ? { firstMs: new Date(row.first).getTime(), lastMs: new Date(row.last).getTime() } : null;
  }

  /**
   * The 15-minute rows of some units in [from, to), as columns. Kept lean: one prepared statement (the binary protocol
   * sends doubles as 8 bytes, not text to parse: about 5× faster here than the query builder), rows as arrays, the
   * bucket as epoch milliseconds computed by the server (no DATETIME parsed into a Date), each value copied straight
   * into its column. A row off the 15-minute grid is skipped (the rollup writes none).
   */
  async quarterColumns(unitIds: readonly number[], fromMs: number, toMs: number): Promise<StatementColumns> {
    const c = emptyStatementColumns(unitIds, fromMs, toMs);
    if (!unitIds.length || !c.buckets) return c;
    const sql = `SELECT unit_id, CAST(UNIX_TIMESTAMP(bucket) * 1000 AS DOUBLE), minutes, poa_avg_wm2, energy_wh, module_temp_avg_c,
                        settled_min, stowed_min, held_min, fault_min,
                        model_unit_wm2, model_best_wm2, model_fixed_wm2, model_sun_wm2
                 FROM telemetry_15m WHERE unit_id IN (${unitIds.map(() => '?').join(',')}) AND bucket >= ? AND bucket < ?`;
    const conn = (await this.db.client.acquireConnection()) as PreparedConnection;
    let rows: (number | null)[][];
    try {
      rows = await new Promise((resolve, reject) =>
        conn.execute({ sql, rowsAsArray: true }, [...unitIds, new Date(fromMs), new Date(toMs)], (err, res) =>
          err ? reject(err) : resolve(res as (number | null)[][]),
        ),
      );
    } finally {
      await this.db.client.releaseConnection(conn);
    }
    const slotOf = new Map(unitIds.map((id, slot) => [id, slot]));
    const cols = COLUMN_KEYS.map((k) => c[k]);
    const nCols = cols.length;
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]!;
      const k = (Math.round(r[1]!) - fromMs) / QUARTER_MS;
      if (!Number.isInteger(k) || k < 0 || k >= c.buckets) continue;
      const ix = slotOf.get(r[0]!)! * c.buckets + k;
      for (let j = 0; j < nCols; j++) {
        const v = r[j + 2];
        if (v !== null) cols[j]![ix] = v!;
      }
      c.rows++;
    }
    return c;
  }

  /** Tickets of a site whose interval (opening → resolution, else closing or cancelling) overlaps [from, to). */
  async tickets(siteId: number, fromMs: number, toMs: number): Promise<StatementTicket[]> {
    const rows = await this.db('tickets')
      .where({ site_id: siteId })
      .andWhere('opened_at', '<', new Date(toMs))
      .andWhere((q) =>
        q
          .whereRaw('COALESCE(resolved_at, closed_at, cancelled_at) IS NULL')
          .orWhereRaw('COALESCE(resolved_at, closed_at, cancelled_at) >= ?', [new Date(fromMs)]),
      )
      .select('id', 'unit_id', 'availability_category', 'opened_at', 'resolved_at', 'closed_at', 'cancelled_at');
    const ms = (d: Date | null) => (d ? new Date(d).getTime() : null);
    return rows.map((r) => ({
      id: r.id,
      unitId: r.unit_id,
      category: r.availability_category,
      fromMs: ms(r.opened_at)!,
      toMs: ms(r.resolved_at) ?? ms(r.closed_at) ?? ms(r.cancelled_at),
      openedMs: ms(r.opened_at)!,
      closedMs: ms(r.closed_at),
    }));
  }

  /** Stall and soiling alarms of a site's units overlapping [from, to). */
  async alarms(siteId: number, fromMs: number, toMs: number): Promise<StatementAlarm[]> {
    const rows = await this.db('alarms')
      .where({ site_id: siteId })
      .whereNotNull('unit_id')
      .whereIn('kind', ['stall', 'soiling'])
      .andWhere('raised_at', '<', new Date(toMs))
      .andWhere((q) => q.whereNull('cleared_at').orWhere('cleared_at', '>=', new Date(fromMs)))
      .select('unit_id', 'kind', 'raised_at', 'cleared_at');
    return rows.map((r) => ({
      unitId: r.unit_id,
      kind: r.kind,
      fromMs: new Date(r.raised_at).getTime(),
      toMs: r.cleared_at ? new Date(r.cleared_at).getTime() : null,
    }));
  }
}
