import type { AvailabilityCategory } from '../../shared/contracts/tickets';
import type { Db } from './db';

/** One 15-minute bucket of one unit as the statements read it (nullable columns are missing in older rows). */
export interface StatementQuarter {
  unitId: number;
  bucketMs: number;
  minutes: number;
  poaAvgWm2: number;
  energyWh: number;
  moduleTempC: number | null;
  seekingMin: number | null;
  settledMin: number | null;
  scanningMin: number | null;
  stowedMin: number | null;
  heldMin: number | null;
  faultMin: number | null;
  modelUnitWm2: number | null;
  modelBestWm2: number | null;
  modelFixedWm2: number | null;
  modelSunWm2: number | null;
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
   * The 15-minute rows of some units in [from, to). A month of a 100-unit site is ≈ 290,000 rows, so the read is kept
   * lean: one prepared statement (the binary protocol sends doubles as 8 bytes, not text to parse: about 5× faster here
   * than the query builder), rows as arrays, the bucket as epoch milliseconds computed by the server (no DATETIME parsed
   * into a Date), and one object per row, built directly.
   */
  async quarters(unitIds: number[], fromMs: number, toMs: number): Promise<StatementQuarter[]> {
    if (!unitIds.length) return [];
    const sql = `SELECT unit_id, CAST(UNIX_TIMESTAMP(bucket) * 1000 AS DOUBLE), minutes, poa_avg_wm2, energy_wh, module_temp_avg_c,
                        seeking_min, settled_min, scanning_min, stowed_min, held_min, fault_min,
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
    const out: StatementQuarter[] = new Array(rows.length);
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]!;
      out[i] = {
        unitId: r[0]!,
        bucketMs: Math.round(r[1]!),
        minutes: r[2]!,
        poaAvgWm2: r[3]!,
        energyWh: r[4]!,
        moduleTempC: r[5]!,
        seekingMin: r[6]!,
        settledMin: r[7]!,
        scanningMin: r[8]!,
        stowedMin: r[9]!,
        heldMin: r[10]!,
        faultMin: r[11]!,
        modelUnitWm2: r[12]!,
        modelBestWm2: r[13]!,
        modelFixedWm2: r[14]!,
        modelSunWm2: r[15]!,
      };
    }
    return out;
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
