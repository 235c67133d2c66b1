import type { Logger } from 'pino';
import { z } from 'zod';
import {
  MAX_PAYLOAD_BYTES, ackSchema, eventSchema, statusSchema, telemetrySchema, weatherSchema,
  type CommandAck, type Telemetry, type UnitEvent, type UnitStatus,
} from '../../shared/contracts/wire';
import type { EventRow, TelemetryRepository, TelemetryRow, WeatherRow } from '../data/telemetry-repository';
import type { UnitDirectory, UnitInfo } from './unit-directory';

export const REJECT_REASONS = [
  'oversized', 'malformed_json', 'invalid_payload', 'unknown_unit', 'disabled_unit', 'future_timestamp', 'too_old', 'unknown_topic', 'acl_denied',
] as const;
export type RejectReason = (typeof REJECT_REASONS)[number];

export interface IngestOptions {
  /** Flush when this many rows are buffered [rows]. */
  batchRows: number;
  /** …or after this long [ms]. */
  flushMs: number;
  /** Above this many buffered rows, deliveries are held (MQTT backpressure) until half of it drains [rows]. */
  maxBufferRows: number;
  /** Concurrent flushes (database connections used by ingest). */
  flushConcurrency: number;
  /** Raw samples older than this are refused [days]. */
  retentionDays: number;
  /** Timestamps further ahead than this are refused [ms]. */
  futureToleranceMs: number;
  now: () => number;
}

export const DEFAULT_INGEST_OPTIONS: IngestOptions = {
  batchRows: 1000, flushMs: 250, maxBufferRows: 200_000, flushConcurrency: 2, retentionDays: 400, futureToleranceMs: 5 * 60_000, now: Date.now,
};

/** What the rest of the server hears from the ingest (live state, commands, health detectors). */
export interface IngestListeners {
  telemetry?: (unit: UnitInfo, t: Telemetry) => void;
  event?: (unit: UnitInfo, e: UnitEvent) => void;
  ack?: (unit: UnitInfo, a: CommandAck) => void;
  status?: (unit: UnitInfo, s: UnitStatus) => void;
  /** Rows durably stored, with the commit time (benchmarks measure publish → commit from it). */
  committed?: (rows: TelemetryRow[], committedAtMs: number) => void;
}

export interface IngestCounters {
  received: number;
  stored: number;
  duplicates: number;
  rejected: Record<RejectReason, number>;
  buffered: number;
  flushes: number;
  flushFailures: number;
  databaseUp: boolean;
  held: number;
}

/**
 * Validates unit messages and writes them to MariaDB in batched multi-row inserts. Nothing is dropped once accepted:
 * a failed flush puts its rows back and retries with backoff, and past `maxBufferRows` the MQTT deliveries are held,
 * which stops aedes reading from the publishers' sockets until the buffer drains.
 */
export class IngestService {
  private telemetry: TelemetryRow[] = [];
  private events: EventRow[] = [];
  private weather: WeatherRow[] = [];
  private inFlight = 0;
  private timer: NodeJS.Timeout | undefined;
  private retryAt = 0;
  private backoffMs = 500;
  private held: (() => void)[] = [];
  private lastLog = new Map<string, number>();
  private stopped = false;
  readonly counters: IngestCounters = {
    received: 0, stored: 0, duplicates: 0, flushes: 0, flushFailures: 0, databaseUp: true, buffered: 0, held: 0,
    rejected: Object.fromEntries(REJECT_REASONS.map((r) => [r, 0])) as Record<RejectReason, number>,
  };
  private readonly opts: IngestOptions;

  constructor(
    private readonly repo: TelemetryRepository,
    private readonly units: UnitDirectory,
    private readonly log: Logger,
    private readonly listeners: IngestListeners = {},
    opts: Partial<IngestOptions> = {},
    /** Called with the (unit, minute) pairs of newly stored rows, for the rollups. */
    private readonly onStored: (rows: TelemetryRow[]) => void = () => undefined,
  ) {
    this.opts = { ...DEFAULT_INGEST_OPTIONS, ...opts };
  }

  get bufferedRows(): number {
    return this.telemetry.length + this.events.length + this.weather.length;
  }

  /** Whether new deliveries should wait (the buffer is over its high-water mark). */
  get saturated(): boolean {
    return this.bufferedRows >= this.opts.maxBufferRows;
  }

  /** Calls `resume` once the buffer is below half its high-water mark. */
  whenDrained(resume: () => void): void {
    this.counters.held++;
    this.held.push(resume);
  }

  /** Handles one MQTT message from a unit's prefix. Returns the reject reason, or null when accepted. */
  accept(serial: string, leaf: string, payload: Buffer): RejectReason | null {
    this.counters.received++;
    if (payload.length > MAX_PAYLOAD_BYTES) return this.reject(serial, 'oversized', `${payload.length} bytes > ${MAX_PAYLOAD_BYTES}`);
    const unit = this.units.get(serial);
    if (!unit) return this.reject(serial, 'unknown_unit', 'no unit has this serial');
    if (unit.disabled) return this.reject(serial, 'disabled_unit', 'unit is disabled');
    let json: unknown;
    try {
      json = JSON.parse(payload.toString('utf8'));
    } catch {
      return this.reject(serial, 'malformed_json', 'payload is not JSON');
    }
    switch (leaf) {
      case 'telemetry': {
        const t = this.validate(serial, telemetrySchema, json);
        if (!t) return 'invalid_payload';
        const ts = Date.parse(t.ts);
        const bad = this.checkTime(serial, ts);
        if (bad) return bad;
        this.telemetry.push(toRow(unit.id, t, ts, this.opts.now()));
        this.listeners.telemetry?.(unit, t);
        break;
      }
      case 'events': {
        const e = this.validate(serial, eventSchema, json);
        if (!e) return 'invalid_payload';
        const ts = Date.parse(e.ts);
        const bad = this.checkTime(serial, ts);
        if (bad) return bad;
        this.events.push({ unit_id: unit.id, ts: new Date(ts), kind: e.kind, body: JSON.stringify(e) });
        this.listeners.event?.(unit, e);
        break;
      }
      case 'weather': {
        const w = this.validate(serial, weatherSchema, json);
        if (!w) return 'invalid_payload';
        const ts = Date.parse(w.ts);
        const bad = this.checkTime(serial, ts);
        if (bad) return bad;
        this.weather.push({ site_id: unit.siteId, ts: new Date(ts), ghi_wm2: w.ghiWm2, dhi_wm2: w.dhiWm2 ?? null, air_temp_c: w.airTempC, wind_ms: w.windMs, gust_ms: w.gustMs });
        break;
      }
      case 'acks': {
        const a = this.validate(serial, ackSchema, json);
        if (!a) return 'invalid_payload';
        this.listeners.ack?.(unit, a);
        return null;
      }
      case 'status': {
        const s = this.validate(serial, statusSchema, json);
        if (!s) return 'invalid_payload';
        this.listeners.status?.(unit, s);
        return null;
      }
      default:
        return this.reject(serial, 'unknown_topic', `no such leaf "${leaf}"`);
    }
    this.schedule();
    return null;
  }

  /** Counts a publish the broker refused (outside the unit's prefix). */
  countDenied(serial: string, topic: string): void {
    this.counters.received++;
    this.reject(serial, 'acl_denied', `publish to ${topic}`);
  }

  private validate<T extends z.ZodType>(serial: string, schema: T, json: unknown): z.infer<T> | null {
    const r = schema.safeParse(json);
    if (r.success) return r.data;
    const first = r.error.issues[0]!;
    this.reject(serial, 'invalid_payload', `${first.path.join('.') || '(payload)'}: ${first.message}`);
    return null;
  }

  private checkTime(serial: string, ts: number): RejectReason | null {
    const now = this.opts.now();
    if (ts > now + this.opts.futureToleranceMs) return this.reject(serial, 'future_timestamp', `ts ${new Date(ts).toISOString()} is ahead of server time`);
    if (ts < now - this.opts.retentionDays * 86_400_000) return this.reject(serial, 'too_old', `ts ${new Date(ts).toISOString()} is older than the retention`);
    return null;
  }

  private reject(serial: string, reason: RejectReason, detail: string): RejectReason {
    this.counters.rejected[reason]++;
    const key = `${serial}|${reason}`;
    const now = this.opts.now();
    if ((this.lastLog.get(key) ?? 0) < now - 60_000) {
      this.lastLog.set(key, now);
      if (this.lastLog.size > 50_000) this.lastLog.clear();
      this.log.warn({ serial, reason, detail }, 'unit message rejected');
    }
    return reason;
  }

  private schedule(): void {
    if (this.stopped) return;
    if (this.bufferedRows >= this.opts.batchRows) {
      this.pump();
    } else if (!this.timer) {
      this.timer = setTimeout(() => {
        this.timer = undefined;
        this.pump();
      }, this.opts.flushMs);
    }
  }

  private pump(): void {
    while (this.inFlight < this.opts.flushConcurrency && this.bufferedRows > 0 && this.opts.now() >= this.retryAt) {
      // Key order inside a batch keeps concurrent flushes taking InnoDB locks in the same order (fewer deadlocks).
      const t = this.telemetry.splice(0, this.opts.batchRows).sort((a, b) => a.unit_id - b.unit_id || a.ts.getTime() - b.ts.getTime());
      const e = t.length < this.opts.batchRows ? this.events.splice(0, this.opts.batchRows) : [];
      const w = t.length + e.length < this.opts.batchRows ? this.weather.splice(0, this.opts.batchRows) : [];
      this.inFlight++;
      void this.write(t, e, w).finally(() => {
        this.inFlight--;
        this.releaseHeld();
        if (this.bufferedRows > 0) this.schedule();
      });
    }
    this.counters.buffered = this.bufferedRows;
    if (this.bufferedRows > 0 && !this.timer && this.inFlight < this.opts.flushConcurrency) {
      const wait = Math.max(this.opts.flushMs, this.retryAt - this.opts.now());
      this.timer = setTimeout(() => {
        this.timer = undefined;
        this.pump();
      }, wait);
    }
  }

  private async write(t: TelemetryRow[], e: EventRow[], w: WeatherRow[]): Promise<void> {
    try {
      const stored = await this.repo.insertTelemetry(t);
      await this.repo.insertEvents(e);
      await this.repo.insertWeather(w);
      this.counters.stored += stored;
      this.counters.duplicates += t.length - stored;
      this.counters.flushes++;
      if (!this.counters.databaseUp) this.log.info({ buffered: this.bufferedRows }, 'database is back; draining the ingest buffer');
      this.counters.databaseUp = true;
      this.backoffMs = 500;
      if (t.length) {
        this.onStored(t);
        this.listeners.committed?.(t, this.opts.now());
      }
    } catch (err) {
      // Keep every row, in order, and try again. INSERT IGNORE makes a partial earlier success harmless.
      this.telemetry.unshift(...t);
      this.events.unshift(...e);
      this.weather.unshift(...w);
      this.counters.flushFailures++;
      const code = (err as { code?: string }).code;
      if (code === 'ER_LOCK_DEADLOCK' || code === 'ER_LOCK_WAIT_TIMEOUT') return; // a lost race between flushes: retry at once
      if (this.counters.databaseUp) this.log.error({ code, error: (err as { sqlMessage?: string }).sqlMessage ?? (err as Error).message.slice(0, 200), buffered: this.bufferedRows }, 'ingest flush failed; buffering and retrying');
      this.counters.databaseUp = false;
      this.retryAt = this.opts.now() + this.backoffMs;
      this.backoffMs = Math.min(this.backoffMs * 2, 5000);
    }
  }

  private releaseHeld(): void {
    if (this.bufferedRows > this.opts.maxBufferRows / 2) return;
    const held = this.held;
    this.held = [];
    for (const resume of held) resume();
  }

  /** Flushes everything (used at shutdown and by tests); resolves when the buffer is empty or the deadline passes. */
  async drain(timeoutMs = 10_000): Promise<boolean> {
    const deadline = Date.now() + timeoutMs;
    while ((this.bufferedRows > 0 || this.inFlight > 0) && Date.now() < deadline) {
      this.retryAt = Math.min(this.retryAt, this.opts.now());
      this.pump();
      await new Promise((r) => setTimeout(r, 20));
    }
    return this.bufferedRows === 0 && this.inFlight === 0;
  }

  stop(): void {
    this.stopped = true;
    clearTimeout(this.timer);
    this.releaseHeld();
  }
}

function toRow(unitId: number, t: Telemetry, ts: number, now: number): TelemetryRow {
  return {
    unit_id: unitId, ts: new Date(ts), seq: t.seq, tilt_plus_wm2: t.tiltPlusWm2, tilt_minus_wm2: t.tiltMinusWm2,
    azimuth_plus_wm2: t.azimuthPlusWm2, azimuth_minus_wm2: t.azimuthMinusWm2, poa_wm2: t.poaWm2, tilt_deg: t.tiltDeg,
    azimuth_deg: t.azimuthDeg, cmd_tilt_deg: t.cmdTiltDeg, cmd_azimuth_deg: t.cmdAzimuthDeg, tilt_motor_a: t.tiltMotorA,
    azimuth_motor_a: t.azimuthMotorA, dc_power_w: t.dcPowerW, module_temp_c: t.moduleTempC, mode: t.mode, received_at: new Date(now),
  };
}
