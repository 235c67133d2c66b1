import type { Db } from './db';
import { TELEMETRY_COLUMNS, type TelemetryRow } from './telemetry-repository';

/** One unit's 15-minute rollup row as the history loader writes it (before the server has raw rows for that time). */
export interface QuarterRow {
  unitId: number;
  bucket: Date;
  minutes: number;
  samples: number;
  poaAvgWm2: number;
  poaMaxWm2: number;
  dcPowerAvgW: number;
  energyWh: number;
}

/** Progress of a fill of the demo's past (the `demo_history` table). */
export interface HistoryProgress {
  id: number;
  plannedAt: Date;
  state: 'loading' | 'background' | 'done' | 'failed';
  daysTotal: number;
  daysDone: number;
  backgroundFrom: Date | null;
  backgroundTo: Date | null;
  message: string;
  updatedAt: Date;
}

interface ProgressRow {
  id: number;
  planned_at: Date;
  state: HistoryProgress['state'];
  days_total: number;
  days_done: number;
  background_from: Date | null;
  background_to: Date | null;
  message: string;
  updated_at: Date;
}

interface RawConnection {
  query(sql: string, cb: (err: Error | null, res: unknown) => void): void;
  escape(v: unknown): string;
}

const sqlTime = (d: Date) => `'${d.toISOString().slice(0, 23).replace('T', ' ')}'`;
const sqlNumber = (x: number) => {
  if (!Number.isFinite(x)) throw new RangeError(`not a finite number: ${x}`);
  return String(x);
};

/**
 * Bulk writes of the generated past. Rows go in as multi-row `INSERT IGNORE` statements with the values written into the
 * SQL text (numbers checked finite, strings escaped by the driver), several thousand rows per statement: the keys make a
 * re-run harmless. Reading the live tables stays with TelemetryRepository and the rollup code.
 */
export class HistoryRepository {
  constructor(private readonly db: Db) {}

  /** Newest raw report of any unit [ms], or null when there is none. */
  async latestReportMs(unitIds: number[]): Promise<number | null> {
    if (!unitIds.length) return null;
    const row = (await this.db('telemetry').whereIn('unit_id', unitIds).max({ ts: 'ts' }).first()) as { ts: Date | null } | undefined;
    return row?.ts ? new Date(row.ts).getTime() : null;
  }

  private async run(sql: string): Promise<number> {
    const conn = (await this.db.client.acquireConnection()) as RawConnection;
    try {
      return await new Promise<number>((resolve, reject) =>
        conn.query(sql, (err, res) => (err ? reject(err) : resolve((res as { affectedRows?: number }).affectedRows ?? 0))),
      );
    } finally {
      await this.db.client.releaseConnection(conn);
    }
  }

  private async escape(): Promise<(v: unknown) => string> {
    const conn = (await this.db.client.acquireConnection()) as RawConnection;
    const esc = conn.escape.bind(conn);
    await this.db.client.releaseConnection(conn);
    return esc;
  }

  /** Raw reports, `INSERT IGNORE` on (unit, ts); returns the rows actually added. */
  async insertTelemetry(rows: TelemetryRow[], chunk = 4000): Promise<number> {
    if (!rows.length) return 0;
    const esc = await this.escape();
    let added = 0;
    for (let i = 0; i < rows.length; i += chunk) {
      const values = rows
        .slice(i, i + chunk)
        .map(
          (r) =>
            `(${TELEMETRY_COLUMNS.map((c) => {
              const v = r[c];
              return v instanceof Date ? sqlTime(v) : typeof v === 'number' ? sqlNumber(v) : esc(v);
            }).join(',')})`,
        )
        .join(',');
      added += await this.run(`INSERT IGNORE INTO telemetry (${TELEMETRY_COLUMNS.join(',')}) VALUES ${values}`);
    }
    return added;
  }

  /** 15-minute rollup rows of the rollup-level past, `INSERT IGNORE` on (unit, bucket): rows the server rolled up stay. */
  async insertQuarters(rows: QuarterRow[], chunk = 5000): Promise<number> {
    let added = 0;
    for (let i = 0; i < rows.length; i += chunk) {
      const values = rows
        .slice(i, i + chunk)
        .map(
          (r) =>
            `(${r.unitId},${sqlTime(r.bucket)},${[r.minutes, r.samples, r.poaAvgWm2, r.poaMaxWm2, r.dcPowerAvgW, r.energyWh].map(sqlNumber).join(',')})`,
        )
        .join(',');
      added += await this.run(
        `INSERT IGNORE INTO telemetry_15m (unit_id, bucket, minutes, samples, poa_avg_wm2, poa_max_wm2, dc_power_avg_w, energy_wh) VALUES ${values}`,
      );
    }
    return added;
  }

  /** Removes rollup-level quarters of some units in [from, to) before their raw rows are rolled up there. */
  async deleteQuarters(unitIds: number[], from: Date, to: Date): Promise<number> {
    if (!unitIds.length) return 0;
    return this.db('telemetry_15m').whereIn('unit_id', unitIds).andWhere('bucket', '>=', from).andWhere('bucket', '<', to).delete();
  }

  /** First and last 15-minute bucket of some units (for the range of daily sums to rebuild). */
  async quarterSpan(unitIds: number[]): Promise<{ first: Date; last: Date } | null> {
    if (!unitIds.length) return null;
    const row = (await this.db('telemetry_15m').whereIn('unit_id', unitIds).min({ first: 'bucket' }).max({ last: 'bucket' }).first()) as
      { first: Date | null; last: Date | null } | undefined;
    return row?.first && row.last ? { first: new Date(row.first), last: new Date(row.last) } : null;
  }

  /** Keys `unit|kind|firstSeenMs` of the stored alarms of some units first seen in [from, to) (a re-run adds none twice). */
  async alarmKeys(unitIds: number[], from: Date, to: Date): Promise<Set<string>> {
    if (!unitIds.length) return new Set();
    const rows: { unit_id: number; kind: string; first_seen_at: Date }[] = await this.db('alarms')
      .whereIn('unit_id', unitIds)
      .andWhere('first_seen_at', '>=', from)
      .andWhere('first_seen_at', '<', to)
      .select('unit_id', 'kind', 'first_seen_at');
    return new Set(rows.map((r) => `${r.unit_id}|${r.kind}|${new Date(r.first_seen_at).getTime()}`));
  }

  async startProgress(p: Omit<HistoryProgress, 'id' | 'updatedAt'>): Promise<number> {
    const [id] = await this.db('demo_history').insert({ ...progressRow(p), updated_at: new Date() });
    return id!;
  }

  async updateProgress(id: number, p: Partial<Omit<HistoryProgress, 'id' | 'updatedAt' | 'plannedAt'>>): Promise<void> {
    await this.db('demo_history')
      .where({ id })
      .update({ ...progressRow(p), updated_at: new Date() });
  }

  /** Fills with full-rate days still to do (interrupted background work), oldest plan first. */
  async unfinished(): Promise<HistoryProgress[]> {
    const rows: ProgressRow[] = await this.db('demo_history').whereIn('state', ['background', 'loading']).orderBy('id');
    return rows.map(progressOf);
  }

  /** The newest fill, or undefined when the demo's past was never generated. */
  async latest(): Promise<HistoryProgress | undefined> {
    const row = (await this.db('demo_history').orderBy('id', 'desc').first()) as ProgressRow | undefined;
    return row ? progressOf(row) : undefined;
  }
}

function progressRow(p: Partial<Omit<HistoryProgress, 'id' | 'updatedAt'>>): Partial<ProgressRow> {
  const out: Partial<ProgressRow> = {};
  if (p.plannedAt !== undefined) out.planned_at = p.plannedAt;
  if (p.state !== undefined) out.state = p.state;
  if (p.daysTotal !== undefined) out.days_total = p.daysTotal;
  if (p.daysDone !== undefined) out.days_done = p.daysDone;
  if (p.backgroundFrom !== undefined) out.background_from = p.backgroundFrom;
  if (p.backgroundTo !== undefined) out.background_to = p.backgroundTo;
  if (p.message !== undefined) out.message = p.message.slice(0, 300);
  return out;
}

function progressOf(r: ProgressRow): HistoryProgress {
  return {
    id: r.id,
    plannedAt: new Date(r.planned_at),
    state: r.state,
    daysTotal: r.days_total,
    daysDone: r.days_done,
    backgroundFrom: r.background_from ? new Date(r.background_from) : null,
    backgroundTo: r.background_to ? new Date(r.background_to) : null,
    message: r.message,
    updatedAt: new Date(r.updated_at),
  };
}
