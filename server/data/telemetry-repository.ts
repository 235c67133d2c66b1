import { format, type SqlValue } from 'mysql2';
import type { Telemetry, UnitEvent, Weather } from '../../shared/contracts/wire';
import { UNIT_MODES } from '../../shared/contracts/wire-format';
import type { Db } from './db';
import { TRACE_EXTREMES } from './trace-columns';

/** A validated telemetry row as stored (UTC `Date`s). */
export interface TelemetryRow {
  unit_id: number;
  ts: Date;
  seq: number;
  tilt_plus_wm2: number;
  tilt_minus_wm2: number;
  azimuth_plus_wm2: number;
  azimuth_minus_wm2: number;
  poa_wm2: number;
  tilt_deg: number;
  azimuth_deg: number;
  cmd_tilt_deg: number;
  cmd_azimuth_deg: number;
  tilt_motor_a: number;
  azimuth_motor_a: number;
  dc_power_w: number;
  module_temp_c: number;
  mode: string;
  received_at: Date;
}

export const TELEMETRY_COLUMNS: (keyof TelemetryRow)[] = [
  'unit_id',
  'ts',
  'seq',
  'tilt_plus_wm2',
  'tilt_minus_wm2',
  'azimuth_plus_wm2',
  'azimuth_minus_wm2',
  'poa_wm2',
  'tilt_deg',
  'azimuth_deg',
  'cmd_tilt_deg',
  'cmd_azimuth_deg',
  'tilt_motor_a',
  'azimuth_motor_a',
  'dc_power_w',
  'module_temp_c',
  'mode',
  'received_at',
];

/** A unit's newest stored report (what a restart rebuilds the live picture and the comms watch from). */
export interface LatestReport {
  unitId: number;
  ts: Date;
  receivedAt: Date;
  mode: string;
  poaWm2: number;
  dcPowerW: number;
  tiltDeg: number;
  azimuthDeg: number;
  cmdTiltDeg: number;
  cmdAzimuthDeg: number;
  tiltPlusWm2: number;
  tiltMinusWm2: number;
  azimuthPlusWm2: number;
  azimuthMinusWm2: number;
  moduleTempC: number;
}

export interface EventRow {
  unit_id: number;
  ts: Date;
  kind: string;
  body: string;
}
export interface WeatherRow {
  site_id: number;
  ts: Date;
  ghi_wm2: number;
  dhi_wm2: number | null;
  air_temp_c: number;
  wind_ms: number;
  gust_ms: number;
}

/** The stored row of a validated report (`tsMs` its parsed timestamp, `receivedMs` when it arrived). */
export function telemetryRowOf(unitId: number, t: Telemetry, tsMs: number, receivedMs: number): TelemetryRow {
  return {
    unit_id: unitId,
    ts: new Date(tsMs),
    seq: t.seq,
    tilt_plus_wm2: t.tiltPlusWm2,
    tilt_minus_wm2: t.tiltMinusWm2,
    azimuth_plus_wm2: t.azimuthPlusWm2,
    azimuth_minus_wm2: t.azimuthMinusWm2,
    poa_wm2: t.poaWm2,
    tilt_deg: t.tiltDeg,
    azimuth_deg: t.azimuthDeg,
    cmd_tilt_deg: t.cmdTiltDeg,
    cmd_azimuth_deg: t.cmdAzimuthDeg,
    tilt_motor_a: t.tiltMotorA,
    azimuth_motor_a: t.azimuthMotorA,
    dc_power_w: t.dcPowerW,
    module_temp_c: t.moduleTempC,
    mode: t.mode,
    received_at: new Date(receivedMs),
  };
}

/** The stored row of a validated unit event. */
export const eventRowOf = (unitId: number, e: UnitEvent, tsMs: number): EventRow => ({
  unit_id: unitId,
  ts: new Date(tsMs),
  kind: e.kind,
  body: JSON.stringify(e),
});

/** The stored row of a validated weather reading of a site. */
export const weatherRowOf = (siteId: number, w: Weather, tsMs: number): WeatherRow => ({
  site_id: siteId,
  ts: new Date(tsMs),
  ghi_wm2: w.ghiWm2,
  dhi_wm2: w.dhiWm2 ?? null,
  air_temp_c: w.airTempC,
  wind_ms: w.windMs,
  gust_ms: w.gustMs,
});

const MINUTE_MS = 60_000;

/** Reported modes that get a minutes column in the 15-minute rollup (`<mode>_min`; wire-format UNIT_MODES). */
const UNIT_MODE_NAMES = UNIT_MODES.filter((m) => /^[a-z]+$/.test(m));

/** A unit's mean orientation in a 15-minute bucket, its site and its travel [°]. */
export interface QuarterOrientation {
  unitId: number;
  siteId: number;
  tiltDeg: number;
  azimuthDeg: number;
  limits: { tiltRangeDeg: [number, number]; azimuthRangeDeg: [number, number] };
}

/** Modelled in-plane irradiance of one unit's 15-minute bucket [W/m²]. */
export interface QuarterModelValues {
  unitId: number;
  unitWm2: number;
  bestWm2: number;
  fixedWm2: number;
  sunWm2: number;
}

const QUARTER_MS = 15 * MINUTE_MS;

/** A pooled mysql2 connection, as Knex hands it out. */
interface RawConnection {
  query(sql: string, cb: (err: Error | null, res: unknown) => void): void;
}

/** The rows RETURNING named, as `Added` (their keys only when some rows were not added: in a full batch they cost time). */
function added(out: Record<string, unknown>[], given: number, keyOf: (r: Record<string, unknown>) => string): Added {
  return { count: out.length, keys: out.length === given ? null : new Set(out.map(keyOf)) };
}

/** Identity of a telemetry row (its primary key), as the ingest compares rows. */
export const telemetryKey = (unitId: number, ts: Date) => `${unitId}|${ts.getTime()}`;
/** Identities of stored rows, as the insert methods return them for the rows that were new. */
export const telemetryRowKey = (r: TelemetryRow) => telemetryKey(r.unit_id, r.ts);
export const eventRowKey = (r: EventRow) => eventKey(r.unit_id, r.ts, r.kind);
export const weatherRowKey = (r: WeatherRow) => weatherKey(r.site_id, r.ts);
/** Identity of a weather row (its primary key). */
export const weatherKey = (siteId: number, ts: Date) => `${siteId}|${ts.getTime()}`;
/** Identity of a unit event row (its primary key). */
export const eventKey = (unitId: number, ts: Date, kind: string) => `${unitId}|${ts.getTime()}|${kind}`;

/**
 * What a multi-row `INSERT IGNORE` added: `count` rows, and which of them (`keys`, see the `…RowKey` functions) — or
 * `keys: null` when it added every row it was given (the usual case: nothing in the batch was a resend).
 */
export interface Added {
  count: number;
  keys: Set<string> | null;
}

/** Raw telemetry and its rollups. Inserts are `INSERT IGNORE` on the (unit, ts) key: a resend never duplicates. */
export class TelemetryRepository {
  constructor(private readonly db: Db) {}

  /**
   * Multi-row `INSERT IGNORE` on the primary key, one statement (one commit) per call; says which rows were new
   * (`INSERT IGNORE … RETURNING` names only the rows actually inserted), so a resend is never announced twice.
   */
  async insertTelemetry(rows: TelemetryRow[]): Promise<Added> {
    if (!rows.length) return { count: 0, keys: null };
    const out = await this.insertIgnoreReturning('telemetry', TELEMETRY_COLUMNS as string[], rows as unknown as Record<string, unknown>[], [
      'unit_id',
      'ts',
    ]);
    return added(out, rows.length, (r) => telemetryKey(Number(r['unit_id']), r['ts'] as Date));
  }

  /** Like insertTelemetry, for unit events (key: unit, ts, kind). */
  async insertEvents(rows: EventRow[]): Promise<Added> {
    if (!rows.length) return { count: 0, keys: null };
    const out = await this.insertIgnoreReturning(
      'unit_events',
      ['unit_id', 'ts', 'kind', 'body'],
      rows as unknown as Record<string, unknown>[],
      ['unit_id', 'ts', 'kind'],
    );
    return added(out, rows.length, (r) => eventKey(Number(r['unit_id']), r['ts'] as Date, String(r['kind'])));
  }

  /** Like insertTelemetry, for site weather readings (key: site, ts). */
  async insertWeather(rows: WeatherRow[]): Promise<Added> {
    if (!rows.length) return { count: 0, keys: null };
    const out = await this.insertIgnoreReturning(
      'weather',
      ['site_id', 'ts', 'ghi_wm2', 'dhi_wm2', 'air_temp_c', 'wind_ms', 'gust_ms'],
      rows as unknown as Record<string, unknown>[],
      ['site_id', 'ts'],
    );
    return added(out, rows.length, (r) => weatherKey(Number(r['site_id']), r['ts'] as Date));
  }

  private statement(table: string, cols: string[], rows: Record<string, unknown>[]): { sql: string; values: SqlValue[] } {
    const tuple = `(${cols.map(() => '?').join(',')})`;
    const values: SqlValue[] = [];
    for (const r of rows) for (const c of cols) values.push(r[c] as SqlValue);
    return {
      sql: `INSERT IGNORE INTO \`${table}\` (${cols.map((c) => `\`${c}\``).join(',')}) VALUES ${rows.map(() => tuple).join(',')}`,
      values,
    };
  }

  /**
   * The newest stored report of every unit that has one (a restart rebuilds the live picture and the comms watch from
   * it). One loose index scan over the (unit_id, ts) key for the maxima, then one point read per unit.
   */
  async latestPerUnit(): Promise<LatestReport[]> {
    const rows: TelemetryRow[] = await this.db('telemetry as t')
      .join(this.db('telemetry').select('unit_id').max({ ts: 'ts' }).groupBy('unit_id').as('m'), (j) =>
        j.on('m.unit_id', 't.unit_id').andOn('m.ts', 't.ts'),
      )
      .select('t.*');
    return rows.map((r) => ({
      unitId: r.unit_id,
      ts: r.ts,
      receivedAt: r.received_at,
      mode: r.mode,
      poaWm2: r.poa_wm2,
      dcPowerW: r.dc_power_w,
      tiltDeg: r.tilt_deg,
      azimuthDeg: r.azimuth_deg,
      cmdTiltDeg: r.cmd_tilt_deg,
      cmdAzimuthDeg: r.cmd_azimuth_deg,
      tiltPlusWm2: r.tilt_plus_wm2,
      tiltMinusWm2: r.tilt_minus_wm2,
      azimuthPlusWm2: r.azimuth_plus_wm2,
      azimuthMinusWm2: r.azimuth_minus_wm2,
      moduleTempC: r.module_temp_c,
    }));
  }

  /**
   * The statement is formatted once by mysql2's own escaping, with the connection's UTC time zone (`timezone: 'Z'` in
   * db.ts), and sent on a pooled connection directly: through Knex, the 18,000 values of a full batch would be walked
   * once more to rewrite placeholders and the whole text scanned again for its debug log. A connection that fails is
   * marked by Knex's own error handler and not handed out again.
   */
  private async insertIgnoreReturning(
    table: string,
    cols: string[],
    rows: Record<string, unknown>[],
    key: string[],
  ): Promise<Record<string, unknown>[]> {
    const { sql, values } = this.statement(table, cols, rows);
    const text = format(`${sql} RETURNING ${key.map((c) => `\`${c}\``).join(',')}`, values, false, 'Z');
    const conn = (await this.db.client.acquireConnection()) as RawConnection;
    try {
      return await new Promise<Record<string, unknown>[]>((resolve, reject) =>
        conn.query(text, (err, res) => (err ? reject(err) : resolve(res as Record<string, unknown>[]))),
      );
    } finally {
      await this.db.client.releaseConnection(conn);
    }
  }

  /** Recomputes the 1-minute rollup of one minute bucket (epoch ms of the minute start) for the given units. */
  async rollupMinutes(minuteStartMs: number, unitIds: number[]): Promise<void> {
    if (!unitIds.length) return;
    await this.rollupMinuteRange(unitIds, new Date(minuteStartMs), new Date(minuteStartMs + MINUTE_MS));
  }

  /** Recomputes the 1-minute rollup of every minute in [from, to) for the given units (also used to rebuild rollups). */
  async rollupMinuteRange(unitIds: number[], from: Date, to: Date): Promise<void> {
    if (!unitIds.length) return;
    const sets = [
      'samples',
      'poa_avg_wm2',
      'poa_max_wm2',
      'dc_power_avg_w',
      'energy_wh',
      'tilt_avg_deg',
      'azimuth_avg_deg',
      'module_temp_avg_c',
      ...TRACE_EXTREMES.flatMap(([c]) => [`${c}_min`, `${c}_max`]),
    ];
    await this.db.raw(
      `INSERT INTO telemetry_1m (unit_id, bucket, ${sets.join(', ')})
       SELECT unit_id, FROM_UNIXTIME(FLOOR(UNIX_TIMESTAMP(ts) / 60) * 60) AS minute, COUNT(*), AVG(poa_wm2), MAX(poa_wm2), AVG(dc_power_w), AVG(dc_power_w) / 60,
              AVG(tilt_deg), MOD(DEGREES(ATAN2(AVG(SIN(RADIANS(azimuth_deg))), AVG(COS(RADIANS(azimuth_deg))))) + 360, 360), AVG(module_temp_c),
              ${TRACE_EXTREMES.map(([, expr]) => `MIN(${expr}), MAX(${expr})`).join(', ')}
       FROM telemetry WHERE unit_id IN (${unitIds.map(() => '?').join(',')}) AND ts >= ? AND ts < ? GROUP BY unit_id, minute
       ON DUPLICATE KEY UPDATE ${sets.map((c) => `${c} = VALUES(${c})`).join(', ')}`,
      [...unitIds, from, to],
    );
  }

  /**
   * Recomputes the 15-minute rollup of one bucket from the 1-minute rows (energy, means, orientation, module temperature)
   * and, while the raw reports are kept, the minutes spent in each reported mode (a minute split between modes counts
   * its share of reports for each).
   */
  async rollupQuarter(quarterStartMs: number, unitIds: number[]): Promise<void> {
    if (!unitIds.length) return;
    const from = new Date(quarterStartMs);
    const to = new Date(quarterStartMs + QUARTER_MS);
    const ids = unitIds.map(() => '?').join(',');
    const sets = [
      'minutes',
      'samples',
      'poa_avg_wm2',
      'poa_max_wm2',
      'dc_power_avg_w',
      'energy_wh',
      'module_temp_avg_c',
      'tilt_avg_deg',
      'azimuth_avg_deg',
    ];
    await this.db.raw(
      `INSERT INTO telemetry_15m (unit_id, bucket, ${sets.join(', ')})
       SELECT unit_id, ?, COUNT(*), SUM(samples), AVG(poa_avg_wm2), MAX(poa_max_wm2), AVG(dc_power_avg_w), SUM(energy_wh),
              AVG(module_temp_avg_c), AVG(tilt_avg_deg),
              MOD(DEGREES(ATAN2(AVG(SIN(RADIANS(azimuth_avg_deg))), AVG(COS(RADIANS(azimuth_avg_deg))))) + 360, 360)
       FROM telemetry_1m WHERE unit_id IN (${ids}) AND bucket >= ? AND bucket < ? GROUP BY unit_id
       ON DUPLICATE KEY UPDATE ${sets.map((c) => `${c} = VALUES(${c})`).join(', ')}`,
      [from, ...unitIds, from, to],
    );
    const share = UNIT_MODE_NAMES.map((m) => `SUM(mode = '${m}') / COUNT(*) AS ${m}`).join(', ');
    await this.db.raw(
      `UPDATE telemetry_15m q JOIN (
         SELECT unit_id, ${UNIT_MODE_NAMES.map((m) => `SUM(${m}) AS ${m}`).join(', ')} FROM (
           SELECT unit_id, FLOOR(UNIX_TIMESTAMP(ts) / 60) AS minute, ${share}
           FROM telemetry WHERE unit_id IN (${ids}) AND ts >= ? AND ts < ? GROUP BY unit_id, minute) per_minute
         GROUP BY unit_id) m ON m.unit_id = q.unit_id
       SET ${UNIT_MODE_NAMES.map((m) => `q.${m}_min = m.${m}`).join(', ')}
       WHERE q.bucket = ? AND q.unit_id IN (${ids})`,
      [...unitIds, from, to, from, ...unitIds],
    );
  }

  /**
   * Mean orientation of units in one 15-minute bucket with their site and travel (units without a row, or without an
   * orientation, are left out).
   */
  async quarterOrientations(quarterStartMs: number, unitIds: number[]): Promise<QuarterOrientation[]> {
    if (!unitIds.length) return [];
    const rows = await this.db('telemetry_15m as q')
      .join('units as u', 'u.id', 'q.unit_id')
      .whereIn('q.unit_id', unitIds)
      .andWhere('q.bucket', new Date(quarterStartMs))
      .whereNotNull('q.tilt_avg_deg')
      .whereNotNull('q.azimuth_avg_deg')
      .select(
        'q.unit_id',
        'u.site_id',
        'q.tilt_avg_deg',
        'q.azimuth_avg_deg',
        'u.tilt_min_deg',
        'u.tilt_max_deg',
        'u.azimuth_min_deg',
        'u.azimuth_max_deg',
      );
    return rows.map((r) => ({
      unitId: r.unit_id,
      siteId: r.site_id,
      tiltDeg: r.tilt_avg_deg,
      azimuthDeg: r.azimuth_avg_deg,
      limits: { tiltRangeDeg: [r.tilt_min_deg, r.tilt_max_deg], azimuthRangeDeg: [r.azimuth_min_deg, r.azimuth_max_deg] },
    }));
  }

  /** Stores the modelled in-plane irradiances of units' 15-minute bucket [W/m²]. */
  async setQuarterModel(quarterStartMs: number, rows: readonly QuarterModelValues[]): Promise<void> {
    if (!rows.length) return;
    const derived = rows.map(() => 'SELECT ? AS unit_id, ? AS u, ? AS b, ? AS f, ? AS s').join(' UNION ALL ');
    await this.db.raw(
      `UPDATE telemetry_15m q JOIN (${derived}) v ON v.unit_id = q.unit_id
       SET q.model_unit_wm2 = v.u, q.model_best_wm2 = v.b, q.model_fixed_wm2 = v.f, q.model_sun_wm2 = v.s
       WHERE q.bucket = ?`,
      [...rows.flatMap((r) => [r.unitId, r.unitWm2, r.bestWm2, r.fixedWm2, r.sunWm2]), new Date(quarterStartMs)],
    );
  }

  /** Quarter-hour rows of some units in a UTC window (used to sum local days). */
  async quartersBetween(
    unitIds: number[],
    from: Date,
    to: Date,
  ): Promise<{ unitId: number; bucket: Date; energyWh: number; minutes: number }[]> {
    const rows: { unit_id: number; bucket: Date; energy_wh: number; minutes: number }[] = await this.db('telemetry_15m')
      .whereIn('unit_id', unitIds)
      .andWhere('bucket', '>=', from)
      .andWhere('bucket', '<', to)
      .select('unit_id', 'bucket', 'energy_wh', 'minutes');
    return rows.map((r) => ({ unitId: r.unit_id, bucket: r.bucket, energyWh: r.energy_wh, minutes: r.minutes }));
  }

  /** Energy of units' local days [Wh] and the minutes it was summed over. */
  async upsertDaily(days: { unitId: number; localDate: string; energyWh: number; minutes: number }[]): Promise<void> {
    if (!days.length) return;
    const rows = days.map((d) => ({ unit_id: d.unitId, local_date: d.localDate, energy_wh: d.energyWh, minutes: d.minutes }));
    await this.db('energy_daily').insert(rows).onConflict(['unit_id', 'local_date']).merge(['energy_wh', 'minutes']);
  }

  /** Deletes raw rows older than the retention, in chunks so the table is never locked for long. */
  recent(unitId: number, from: Date, to: Date, limit = 20_000): Promise<TelemetryRow[]> {
    return this.db<TelemetryRow>('telemetry')
      .where('unit_id', unitId)
      .andWhere('ts', '>=', from)
      .andWhere('ts', '<', to)
      .orderBy('ts')
      .limit(limit);
  }
}
