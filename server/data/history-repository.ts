import { Readable } from 'node:stream';
import type { Db } from './db';
import { TELEMETRY_COLUMNS, type TelemetryRow, type WeatherRow } from './telemetry-repository';

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
  /** What the statements read (null: not known). */
  moduleTempC: number | null;
  tiltDeg: number | null;
  azimuthDeg: number | null;
  /** Minutes per mode, in `MODE_MINUTE_COLUMNS` order (seeking, settled, scanning, stowed, held, fault). */
  modeMinutes: readonly [number, number, number, number, number, number] | null;
  modelUnitWm2: number | null;
  modelBestWm2: number | null;
  modelFixedWm2: number | null;
  modelSunWm2: number | null;
}

/** Progress of a fill of the demo's past (the `demo_history` table). */
export interface HistoryProgress {
  id: number;
  plannedAt: Date;
  /** Newest stored report when the fill was planned (null: first seeding). */
  lastReportAt: Date | null;
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
  last_report_at: Date | null;
  state: HistoryProgress['state'];
  days_total: number;
  days_done: number;
  background_from: Date | null;
  background_to: Date | null;
  message: string;
  updated_at: Date;
}

interface RawConnection {
  query(q: { sql: string; infileStreamFactory?: () => Readable }, cb: (err: Error | null, res: unknown) => void): void;
}

const WEATHER_COLUMNS: (keyof WeatherRow)[] = ['site_id', 'ts', 'ghi_wm2', 'dhi_wm2', 'air_temp_c', 'wind_ms', 'gust_ms'];
const MODE_MINUTE_COLUMNS = ['seeking_min', 'settled_min', 'scanning_min', 'stowed_min', 'held_min', 'fault_min'];
const QUARTER_COLUMNS = [
  'unit_id',
  'bucket',
  'minutes',
  'samples',
  'poa_avg_wm2',
  'poa_max_wm2',
  'dc_power_avg_w',
  'energy_wh',
  'module_temp_avg_c',
  'tilt_avg_deg',
  'azimuth_avg_deg',
  ...MODE_MINUTE_COLUMNS,
  'model_unit_wm2',
  'model_best_wm2',
  'model_fixed_wm2',
  'model_sun_wm2',
];
const TIME_COLUMNS = new Set(['ts', 'received_at', 'bucket']);

/** A finite number (JSON turns NaN into null, so a bad value must stop here, not become a zero). */
function num(x: number): number {
  if (!Number.isFinite(x)) throw new RangeError(`not a finite number: ${x}`);
  return x;
}

/** A nullable number as a CSV field (`\\N` for NULL). */
const opt = (x: number | null | undefined): string | number => (x === null || x === undefined ? '\\N' : num(x));

/**
 * One CSV field as LOAD DATA reads it (below): `\N` for NULL, times as epoch milliseconds (converted by the statement),
 * finite numbers, quoted and escaped text.
 */
function csvField(v: unknown): string | number {
  if (v === null || v === undefined) return '\\N';
  if (v instanceof Date) return v.getTime();
  if (typeof v === 'number') return num(v);
  if (typeof v === 'boolean') return v ? 1 : 0;
  return `"${String(v).replace(/[\\"]/g, (c) => `\\${c}`)}"`;
}

/**
 * Bulk writes of the generated past: `LOAD DATA LOCAL INFILE … IGNORE` from CSV built in memory (streamed to the driver,
 * no file), tens of thousands of rows per statement; IGNORE on the primary keys makes a re-run harmless. Reading the live
 * tables stays with TelemetryRepository and the rollup code.
 */
export class HistoryRepository {
  constructor(private readonly db: Db) {}

  /** Newest raw report of any unit [ms], or null when there is none. */
  async latestReportMs(unitIds: number[]): Promise<number | null> {
    if (!unitIds.length) return null;
    const row = (await this.db('telemetry').whereIn('unit_id', unitIds).max({ ts: 'ts' }).first()) as { ts: Date | null } | undefined;
    return row?.ts ? new Date(row.ts).getTime() : null;
  }

  /**
   * Loads CSV lines (fields in `cols` order, times as epoch ms) into a table; returns how many rows were added (rows whose
   * key exists are skipped).
   */
  private async load(table: string, cols: readonly string[], lines: string[]): Promise<number> {
    if (!lines.length) return 0;
    // The driver sends each chunk as one packet: chunks of a few thousand rows stay well under the packet limit.
    const chunks: Buffer[] = [];
    for (let i = 0; i < lines.length; i += 2000) chunks.push(Buffer.from(lines.slice(i, i + 2000).join('')));
    const fields = cols.map((c) => (TIME_COLUMNS.has(c) ? `@${c}` : c)).join(',');
    const times = cols.filter((c) => TIME_COLUMNS.has(c)).map((c) => `${c} = FROM_UNIXTIME(CAST(@${c} AS DECIMAL(16, 0)) / 1000)`);
    const conn = (await this.db.client.acquireConnection()) as RawConnection;
    try {
      return await new Promise<number>((resolve, reject) =>
        conn.query(
          {
            // The session time zone is UTC (db.ts), so FROM_UNIXTIME gives UTC times.
            sql: `LOAD DATA LOCAL INFILE 'history.csv' IGNORE INTO TABLE \`${table}\` CHARACTER SET utf8mb4
                  FIELDS TERMINATED BY ',' OPTIONALLY ENCLOSED BY '"' ESCAPED BY '\\\\' LINES TERMINATED BY '\\n' (${fields})
                  ${times.length ? `SET ${times.join(', ')}` : ''}`,
            infileStreamFactory: () => Readable.from(chunks),
          },
          (err, res) => (err ? reject(err) : resolve((res as { affectedRows?: number }).affectedRows ?? 0)),
        ),
      );
    } finally {
      await this.db.client.releaseConnection(conn);
    }
  }

  /** Raw reports (key: unit, ts); returns the rows actually added. */
  async insertTelemetry(rows: TelemetryRow[]): Promise<number> {
    return this.load(
      'telemetry',
      TELEMETRY_COLUMNS,
      rows.map((r) => `${TELEMETRY_COLUMNS.map((c) => csvField(r[c])).join(',')}\n`),
    );
  }

  /** Weather station readings (key: site, ts); returns the rows actually added. */
  async insertWeather(rows: WeatherRow[]): Promise<number> {
    return this.load(
      'weather',
      WEATHER_COLUMNS,
      rows.map((r) => `${WEATHER_COLUMNS.map((c) => csvField(r[c])).join(',')}\n`),
    );
  }

  /** 15-minute rollup rows of the rollup-level past (key: unit, bucket): rows the server rolled up stay. */
  async insertQuarters(rows: QuarterRow[]): Promise<number> {
    return this.load(
      'telemetry_15m',
      QUARTER_COLUMNS,
      // One template per row (no per-field array): the rollup-level past is millions of rows.
      rows.map((r) => {
        const m = r.modeMinutes;
        const modes = m ? `${opt(m[0])},${opt(m[1])},${opt(m[2])},${opt(m[3])},${opt(m[4])},${opt(m[5])}` : '\\N,\\N,\\N,\\N,\\N,\\N';
        return (
          `${num(r.unitId)},${r.bucket.getTime()},${num(r.minutes)},${num(r.samples)},${num(r.poaAvgWm2)},${num(r.poaMaxWm2)},` +
          `${num(r.dcPowerAvgW)},${num(r.energyWh)},${opt(r.moduleTempC)},${opt(r.tiltDeg)},${opt(r.azimuthDeg)},${modes},` +
          `${opt(r.modelUnitWm2)},${opt(r.modelBestWm2)},${opt(r.modelFixedWm2)},${opt(r.modelSunWm2)}\n`
        );
      }),
    );
  }

  /**
   * Buckets in [from, to) of some units rolled up from raw rows (they have a mean orientation) whose model columns are
   * empty, newest first, with the units of each.
   */
  async unmodelledQuarters(unitIds: number[], from: Date, to: Date): Promise<{ bucket: Date; unitIds: number[] }[]> {
    if (!unitIds.length || !(from < to)) return [];
    const rows: { bucket: Date; unit_id: number }[] = await this.db('telemetry_15m')
      .whereIn('unit_id', unitIds)
      .andWhere('bucket', '>=', from)
      .andWhere('bucket', '<', to)
      .whereNull('model_best_wm2')
      .whereNotNull('tilt_avg_deg')
      .orderBy([{ column: 'bucket', order: 'desc' }, 'unit_id'])
      .select('bucket', 'unit_id');
    const out: { bucket: Date; unitIds: number[] }[] = [];
    for (const r of rows) {
      const last = out.at(-1);
      if (last && last.bucket.getTime() === new Date(r.bucket).getTime()) last.unitIds.push(r.unit_id);
      else out.push({ bucket: new Date(r.bucket), unitIds: [r.unit_id] });
    }
    return out;
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

  async updateProgress(id: number, p: Partial<Omit<HistoryProgress, 'id' | 'updatedAt' | 'plannedAt' | 'lastReportAt'>>): Promise<void> {
    await this.db('demo_history')
      .where({ id })
      .update({ ...progressRow(p), updated_at: new Date() });
  }

  /** Fills not complete (a first phase stopped or failed, full-rate days still to do), oldest plan first. */
  async unfinished(): Promise<HistoryProgress[]> {
    const rows: ProgressRow[] = await this.db('demo_history').whereIn('state', ['background', 'loading', 'failed']).orderBy('id');
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
  if (p.lastReportAt !== undefined) out.last_report_at = p.lastReportAt;
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
    lastReportAt: r.last_report_at ? new Date(r.last_report_at) : null,
    state: r.state,
    daysTotal: r.days_total,
    daysDone: r.days_done,
    backgroundFrom: r.background_from ? new Date(r.background_from) : null,
    backgroundTo: r.background_to ? new Date(r.background_to) : null,
    message: r.message,
    updatedAt: new Date(r.updated_at),
  };
}
