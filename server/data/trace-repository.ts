import type { Db } from './db';
import type { TraceQuantity } from '../../shared/contracts/traces';
import { traceColumn, traceSql } from './trace-columns';

/** One bucket as the database returns it: `b` index, `n` samples, then `<q>_lo` / `<q>_hi` per quantity. */
export type BucketRow = { b: number; n: number } & Record<string, number | null>;

/** A raw report as exported: the stored row without its keys and bookkeeping. */
/** One stored reading as the CSV export writes it, in the product's names. */
export interface RawTraceRecord {
  ts: Date;
  mode: string;
  tiltPlusWm2: number;
  tiltMinusWm2: number;
  azimuthPlusWm2: number;
  azimuthMinusWm2: number;
  poaWm2: number;
  tiltDeg: number;
  azimuthDeg: number;
  cmdTiltDeg: number;
  cmdAzimuthDeg: number;
  tiltMotorA: number;
  azimuthMotorA: number;
  dcPowerW: number;
  moduleTempC: number;
}

/** RawTraceRecord field ← telemetry column. */
const RAW_COLUMNS: Record<Exclude<keyof RawTraceRecord, 'ts' | 'mode'>, string> = {
  tiltPlusWm2: 'tilt_plus_wm2',
  tiltMinusWm2: 'tilt_minus_wm2',
  azimuthPlusWm2: 'azimuth_plus_wm2',
  azimuthMinusWm2: 'azimuth_minus_wm2',
  poaWm2: 'poa_wm2',
  tiltDeg: 'tilt_deg',
  azimuthDeg: 'azimuth_deg',
  cmdTiltDeg: 'cmd_tilt_deg',
  cmdAzimuthDeg: 'cmd_azimuth_deg',
  tiltMotorA: 'tilt_motor_a',
  azimuthMotorA: 'azimuth_motor_a',
  dcPowerW: 'dc_power_w',
  moduleTempC: 'module_temp_c',
};

export interface EventMarkRow {
  ts: Date;
  kind: string;
  body: unknown;
}

/** Reads traces: min/max per time bucket computed by MariaDB, raw rows in pages for export, events and alarms. */
export class TraceRepository {
  constructor(private readonly db: Db) {}

  /**
   * Minimum and maximum of each quantity per bucket of `bucketMs` (whole seconds) starting at `from`, over `[from, to)`.
   * Reads the primary key range (unit_id, ts) only; the grouping happens in the database. Long ranges are split into
   * `parts` bucket-aligned slices queried at once, so the database can use more than one core.
   */
  async buckets(
    unitId: number,
    from: Date,
    to: Date,
    bucketMs: number,
    quantities: readonly TraceQuantity[],
    parts = 1,
    origin: Date = from,
  ): Promise<BucketRow[]> {
    const aggregates = quantities.map((q) => `MIN(${traceSql(q)}) AS \`${q}_lo\`, MAX(${traceSql(q)}) AS \`${q}_hi\``).join(', ');
    const sql = `SELECT TIMESTAMPDIFF(SECOND, ?, ts) DIV ? AS b, COUNT(*) AS n, ${aggregates}
       FROM telemetry WHERE unit_id = ? AND ts >= ? AND ts < ?
       GROUP BY b ORDER BY b`;
    const bucketS = Math.max(1, Math.round(bucketMs / 1000));
    const total = Math.ceil((to.getTime() - origin.getTime()) / (bucketS * 1000));
    const perPart = Math.ceil(total / Math.max(1, parts));
    const slices: [Date, Date][] = [];
    for (let first = Math.floor((from.getTime() - origin.getTime()) / (bucketS * 1000)); first < total; first += perPart) {
      const a = new Date(Math.max(from.getTime(), origin.getTime() + first * bucketS * 1000));
      const b = new Date(Math.min(to.getTime(), origin.getTime() + (first + perPart) * bucketS * 1000));
      slices.push([a, b]);
    }
    const results = await Promise.all(
      slices.map(async ([a, b]) => {
        const [rows] = (await this.db.raw(sql, [origin, bucketS, unitId, a, b])) as unknown as [BucketRow[]];
        return rows;
      }),
    );
    return results.flat();
  }

  /**
   * The same buckets read from the 1-minute rollup over [from, to) (minute-aligned; `bucketMs` a whole number of minutes):
   * a month is 43,200 rows instead of half a million.
   */
  async bucketsFromMinutes(
    unitId: number,
    origin: Date,
    from: Date,
    to: Date,
    bucketMs: number,
    quantities: readonly TraceQuantity[],
  ): Promise<BucketRow[]> {
    const aggregates = quantities
      .map((q) => `MIN(${traceColumn(q)}_min) AS \`${q}_lo\`, MAX(${traceColumn(q)}_max) AS \`${q}_hi\``)
      .join(', ');
    const [rows] = (await this.db.raw(
      `SELECT TIMESTAMPDIFF(SECOND, ?, bucket) DIV ? AS b, SUM(samples) AS n, ${aggregates}
       FROM telemetry_1m WHERE unit_id = ? AND bucket >= ? AND bucket < ? GROUP BY b ORDER BY b`,
      [origin, Math.round(bucketMs / 1000), unitId, from, to],
    )) as unknown as [BucketRow[]];
    return rows;
  }

  /** Raw rows in time order, `limit` at a time after `after` (exclusive), for streaming exports. */
  rawPage(unitId: number, after: Date, to: Date, limit: number, inclusive = false): Promise<RawTraceRecord[]> {
    return this.db('telemetry')
      .where('unit_id', unitId)
      .andWhere('ts', inclusive ? '>=' : '>', after)
      .andWhere('ts', '<', to)
      .orderBy('ts')
      .limit(limit)
      .select('ts', 'mode', RAW_COLUMNS);
  }

  /** Events the unit reported in the range, without the bulky scan sample chunks. */
  events(unitId: number, from: Date, to: Date, limit = 500): Promise<EventMarkRow[]> {
    return this.db('unit_events')
      .where('unit_id', unitId)
      .andWhere('ts', '>=', from)
      .andWhere('ts', '<', to)
      .whereNot('kind', 'scan-samples')
      .orderBy('ts')
      .limit(limit)
      .select('ts', 'kind', 'body');
  }

  /** Alarms of the unit raised in the range, oldest first. */
  alarms(
    unitId: number,
    from: Date,
    to: Date,
    limit = 500,
  ): Promise<{ raisedAt: Date; kind: string; severity: string; message: string }[]> {
    return this.db('alarms')
      .where('unit_id', unitId)
      .andWhere('raised_at', '>=', from)
      .andWhere('raised_at', '<', to)
      .orderBy('raised_at')
      .limit(limit)
      .select({ raisedAt: 'raised_at' }, 'kind', 'severity', 'message');
  }
}
