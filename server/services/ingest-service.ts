import type { Logger } from 'pino';
import type { CommandAck, Telemetry, UnitEvent, UnitStatus, Weather } from '../../shared/contracts/wire';
import {
  ackValidator,
  eventValidator,
  statusValidator,
  telemetryValidator,
  weatherValidator,
  type WireValidator,
} from '../../shared/contracts/wire-validators';
import { MAX_PAYLOAD_BYTES } from '../../shared/contracts/wire-format';
import {
  eventRowKey,
  eventRowOf,
  telemetryRowKey,
  telemetryRowOf,
  weatherRowKey,
  weatherRowOf,
  type Added,
  type EventRow,
  type TelemetryRepository,
  type TelemetryRow,
  type WeatherRow,
} from '../data/telemetry-repository';
import type { UnitDirectory, UnitInfo } from './unit-directory';

/**
 * Why a unit message was not taken. Up to `weather_denied` (weather from a unit that is not its site's station) they
 * are decided here: the message is acknowledged and dropped, the connection stays. The last three are the broker's,
 * which closes the connection (MQTT 3.1.1 has no per-message refusal): a publish outside the unit's own publish
 * topics, a retained message other than status, a packet over the broker's size cap.
 */
export const REJECT_REASONS = [
  'oversized',
  'malformed_json',
  'invalid_payload',
  'unknown_unit',
  'disabled_unit',
  'future_timestamp',
  'too_old',
  'unknown_topic',
  'weather_denied',
  'acl_denied',
  'retain_denied',
  'packet_too_large',
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
  batchRows: 1000,
  flushMs: 50,
  maxBufferRows: 200_000,
  flushConcurrency: 2,
  retentionDays: 400,
  futureToleranceMs: 5 * 60_000,
  now: Date.now,
};

/**
 * What the rest of the server hears from the ingest. `stored` and `event` hear each reading exactly once, after the
 * batch holding it committed and only if its row was new (a resend never counts twice, across restarts too);
 * `telemetry` hears every valid report as it arrives, before it is stored, resends included (the live picture, which
 * ignores reports not newer than the last).
 */
export interface IngestListeners {
  telemetry?: (unit: UnitInfo, t: Telemetry) => void;
  stored?: (unit: UnitInfo, t: Telemetry) => void;
  event?: (unit: UnitInfo, e: UnitEvent) => void;
  /** A site weather reading, from the unit that carries the site's station (heard like `event`: once, after its commit). */
  weather?: (unit: UnitInfo, w: Weather) => void;
  /** A command answer; when it returns a promise, the unit's PUBACK waits for it (a rejection closes the connection, so the unit resends). */
  ack?: (unit: UnitInfo, a: CommandAck) => void | Promise<void>;
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

/** Called once a message may be acknowledged to the unit (its row committed); with an error, it must not be. */
export type Acknowledge = (err?: Error) => void;

/** A message answered at once (refused, or handled without a row): acknowledged now, so the unit does not resend it. */
function refused(ack: Acknowledge | undefined, reason: RejectReason | null): RejectReason | null {
  ack?.();
  return reason;
}

interface HeldTelemetry {
  row: TelemetryRow;
  unit: UnitInfo;
  t: Telemetry;
  tsMs: number;
  ack: Acknowledge | undefined;
}
interface HeldEvent {
  row: EventRow;
  unit: UnitInfo;
  e: UnitEvent;
  ack: Acknowledge | undefined;
}
interface HeldWeather {
  row: WeatherRow;
  unit: UnitInfo;
  w: Weather;
  ack: Acknowledge | undefined;
}

/**
 * Validates unit messages and writes them to MariaDB in batched multi-row inserts, one commit per statement (a group
 * commit). A stored message is acknowledged only after its batch committed, so a reading the unit got a PUBACK for is
 * in the database even if this process dies. Nothing is dropped once accepted: a failed flush puts its rows back and
 * retries with backoff, and past `maxBufferRows` new messages wait (so aedes stops reading from their sockets) until
 * the buffer drains.
 */
export class IngestService {
  private telemetry: HeldTelemetry[] = [];
  private events: HeldEvent[] = [];
  private weather: HeldWeather[] = [];
  private inFlight = 0;
  /** Rows of the batches being written: still in memory, so they count against `maxBufferRows`. */
  private inFlightRows = 0;
  /** Listeners hear batches in the order they were taken from the buffer, whatever order concurrent commits finish in. */
  private nextBatch = 0;
  private nextAnnounced = 0;
  private readonly finished = new Map<number, (() => void) | null>();
  private timer: NodeJS.Timeout | undefined;
  private retryAt = 0;
  private backoffMs = 500;
  private held: (() => void)[] = [];
  private lastLog = new Map<string, number>();
  private stopped = false;
  readonly counters: IngestCounters = {
    received: 0,
    stored: 0,
    duplicates: 0,
    flushes: 0,
    flushFailures: 0,
    databaseUp: true,
    buffered: 0,
    held: 0,
    rejected: Object.fromEntries(REJECT_REASONS.map((r) => [r, 0])) as Record<RejectReason, number>,
  };
  private readonly opts: IngestOptions;

  constructor(
    private readonly repo: TelemetryRepository,
    private readonly units: UnitDirectory,
    private readonly log: Logger,
    private readonly listeners: IngestListeners = {},
    opts: Partial<IngestOptions> = {},
    /** Called with the unit and timestamp of the readings of each committed batch, for the rollups. */
    private readonly onStored: (readings: { unitId: number; tsMs: number }[]) => void = () => undefined,
  ) {
    this.opts = { ...DEFAULT_INGEST_OPTIONS, ...opts };
  }

  get bufferedRows(): number {
    return this.telemetry.length + this.events.length + this.weather.length;
  }

  /** Whether new deliveries should wait (rows waiting or being written are over the high-water mark). */
  get saturated(): boolean {
    return this.bufferedRows + this.inFlightRows >= this.opts.maxBufferRows;
  }

  /** Calls `resume` once the buffer is below half its high-water mark. */
  whenDrained(resume: () => void): void {
    this.counters.held++;
    this.held.push(resume);
  }

  /**
   * Takes one MQTT message from a unit's prefix, waiting first while the buffer is over its high-water mark (the
   * broker reads nothing more from that connection meanwhile: back-pressure). `ack` is called when the message may be
   * acknowledged: at once when it is refused (it is dropped and counted, so the unit does not resend it), when
   * handled (status) or answered (acks), and for telemetry, events and weather once the batch holding it committed.
   */
  receive(serial: string, leaf: string, payload: Buffer, ack?: Acknowledge): void {
    if (this.saturated && !this.stopped) this.whenDrained(() => this.receive(serial, leaf, payload, ack));
    else this.accept(serial, leaf, payload, ack);
  }

  /** Validates one message and buffers it (see `receive`). Returns the reject reason, or null when accepted. */
  accept(serial: string, leaf: string, payload: Buffer, ack?: Acknowledge): RejectReason | null {
    this.counters.received++;
    if (payload.length > MAX_PAYLOAD_BYTES)
      return refused(ack, this.reject(serial, 'oversized', `${payload.length} bytes > ${MAX_PAYLOAD_BYTES}`));
    const unit = this.units.get(serial);
    if (!unit) return refused(ack, this.reject(serial, 'unknown_unit', 'no unit has this serial'));
    if (unit.disabled) return refused(ack, this.reject(serial, 'disabled_unit', 'unit is disabled'));
    let json: unknown;
    try {
      json = JSON.parse(payload.toString('utf8'));
    } catch {
      return refused(ack, this.reject(serial, 'malformed_json', 'payload is not JSON'));
    }
    switch (leaf) {
      case 'telemetry': {
        const t = this.validate(serial, telemetryValidator, json);
        if (!t) return refused(ack, 'invalid_payload');
        const ts = Date.parse(t.ts);
        const bad = this.checkTime(serial, ts);
        if (bad) return refused(ack, bad);
        this.telemetry.push({ row: telemetryRowOf(unit.id, t, ts, this.opts.now()), unit, t, tsMs: ts, ack });
        this.listeners.telemetry?.(unit, t);
        break;
      }
      case 'events': {
        const e = this.validate(serial, eventValidator, json);
        if (!e) return refused(ack, 'invalid_payload');
        const ts = Date.parse(e.ts);
        const bad = this.checkTime(serial, ts);
        if (bad) return refused(ack, bad);
        this.events.push({ row: eventRowOf(unit.id, e, ts), unit, e, ack });
        break;
      }
      case 'weather': {
        // Only the unit that carries its site's station may report the site's weather (fake gusts would raise stow alarms).
        if (!unit.weatherStation)
          return refused(ack, this.reject(serial, 'weather_denied', "this unit does not carry its site's weather station"));
        const w = this.validate(serial, weatherValidator, json);
        if (!w) return refused(ack, 'invalid_payload');
        const ts = Date.parse(w.ts);
        const bad = this.checkTime(serial, ts);
        if (bad) return refused(ack, bad);
        this.weather.push({ row: weatherRowOf(unit.siteId, w, ts), unit, w, ack });
        break;
      }
      case 'acks': {
        const a = this.validate(serial, ackValidator, json);
        if (!a) return refused(ack, 'invalid_payload');
        const answered = this.listeners.ack?.(unit, a);
        if (answered)
          answered.then(
            () => ack?.(),
            (err: Error) => ack?.(err),
          );
        else ack?.();
        return null;
      }
      case 'status': {
        const s = this.validate(serial, statusValidator, json);
        if (!s) return refused(ack, 'invalid_payload');
        this.listeners.status?.(unit, s);
        return refused(ack, null);
      }
      default:
        return refused(ack, this.reject(serial, 'unknown_topic', `no such leaf "${leaf}"`));
    }
    this.schedule();
    return null;
  }

  /** Counts a message the broker refused (the reasons it decides: see REJECT_REASONS). */
  countDenied(serial: string, reason: Extract<RejectReason, 'acl_denied' | 'retain_denied' | 'packet_too_large'>, topic: string): void {
    this.counters.received++;
    this.reject(serial, reason, topic ? `publish to ${topic}` : 'packet over the size limit');
  }

  private validate<T>(serial: string, schema: WireValidator<T>, json: unknown): T | null {
    const r = schema.safeParse(json);
    if (r.success) return r.data;
    const first = r.error.issues[0]!;
    this.reject(serial, 'invalid_payload', `${first.path.join('.') || '(payload)'}: ${first.message}`);
    return null;
  }

  private checkTime(serial: string, ts: number): RejectReason | null {
    const now = this.opts.now();
    if (ts > now + this.opts.futureToleranceMs)
      return this.reject(serial, 'future_timestamp', `ts ${new Date(ts).toISOString()} is ahead of server time`);
    if (ts < now - this.opts.retentionDays * 86_400_000)
      return this.reject(serial, 'too_old', `ts ${new Date(ts).toISOString()} is older than the retention`);
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
      const t = this.telemetry.splice(0, this.opts.batchRows).sort((a, b) => a.unit.id - b.unit.id || a.tsMs - b.tsMs);
      const e = t.length < this.opts.batchRows ? this.events.splice(0, this.opts.batchRows) : [];
      const w = t.length + e.length < this.opts.batchRows ? this.weather.splice(0, this.opts.batchRows) : [];
      this.inFlight++;
      const rows = t.length + e.length + w.length;
      this.inFlightRows += rows;
      void this.write(this.nextBatch++, t, e, w).finally(() => {
        this.inFlight--;
        this.inFlightRows -= rows;
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

  /**
   * Writes one batch: each table in one multi-row statement, each statement its own commit (a group commit for every
   * message in it). What committed is acknowledged and announced; what failed goes back, in order, to be retried.
   */
  private async write(batch: number, t: HeldTelemetry[], e: HeldEvent[], w: HeldWeather[]): Promise<void> {
    let newTelemetry: Added | undefined;
    let newEvents: Added | undefined;
    let newWeather: Added | undefined;
    let failure: unknown;
    try {
      newTelemetry = await this.repo.insertTelemetry(t.map((x) => x.row));
      newEvents = await this.repo.insertEvents(e.map((x) => x.row));
      newWeather = await this.repo.insertWeather(w.map((x) => x.row));
    } catch (err) {
      failure = err;
    }
    const tDone = newTelemetry !== undefined;
    const storedCount = newTelemetry?.count ?? 0;
    const eDone = newEvents !== undefined;
    const wDone = failure === undefined;
    // Exactly once: only rows this batch inserted are announced (a batch may hold a reading and its resend).
    this.inOrder(batch, () => {
      // Weather first: a gust demands a stow of the units whose reports of the same batch are judged next.
      if (newWeather) this.announceNew(w, newWeather, weatherRowKey, (x) => this.listeners.weather?.(x.unit, x.w));
      if (newTelemetry) this.announceNew(t, newTelemetry, telemetryRowKey, (x) => this.listeners.stored?.(x.unit, x.t));
      if (newEvents) this.announceNew(e, newEvents, eventRowKey, (x) => this.listeners.event?.(x.unit, x.e));
    });
    if (tDone) {
      this.counters.stored += storedCount;
      this.counters.duplicates += t.length - storedCount;
      if (t.length) {
        this.onStored(t.map((x) => ({ unitId: x.unit.id, tsMs: x.tsMs })));
        if (this.listeners.committed)
          this.listeners.committed(
            t.map((x) => x.row),
            this.opts.now(),
          );
      }
      for (const x of t) x.ack?.();
    }
    if (eDone) for (const x of e) x.ack?.();
    if (wDone) for (const x of w) x.ack?.();
    if (failure === undefined) {
      this.counters.flushes++;
      if (!this.counters.databaseUp) this.log.info({ buffered: this.bufferedRows }, 'database is back; draining the ingest buffer');
      this.counters.databaseUp = true;
      this.backoffMs = 500;
    } else {
      this.failed(tDone ? [] : t, eDone ? [] : e, wDone ? [] : w, failure);
    }
  }

  private inOrder(batch: number, announce: (() => void) | null): void {
    this.finished.set(batch, announce);
    while (this.finished.has(this.nextAnnounced)) {
      const next = this.finished.get(this.nextAnnounced);
      this.finished.delete(this.nextAnnounced++);
      next?.();
    }
  }

  /**
   * Announces the rows of a batch that the insert added, each once (a key is crossed off when announced: a batch may
   * hold a reading and its resend). A listener's failure is logged and never undoes a commit or withholds an
   * acknowledgement.
   */
  private announceNew<X extends { row: R }, R>(items: X[], added: Added, keyOf: (row: R) => string, call: (x: X) => void): void {
    for (const x of items) {
      if (added.keys !== null && !added.keys.delete(keyOf(x.row))) continue;
      try {
        call(x);
      } catch (err) {
        this.log.error({ err }, 'ingest listener failed');
      }
    }
  }

  private failed(t: HeldTelemetry[], e: HeldEvent[], w: HeldWeather[], err: unknown): void {
    // Keep every row not stored yet, in order, and try again.
    this.telemetry.unshift(...t);
    this.events.unshift(...e);
    this.weather.unshift(...w);
    this.counters.flushFailures++;
    const code = (err as { code?: string }).code;
    if (code === 'ER_LOCK_DEADLOCK' || code === 'ER_LOCK_WAIT_TIMEOUT') return; // a lost race between flushes: retry at once
    if (this.counters.databaseUp)
      this.log.error(
        { code, error: (err as { sqlMessage?: string }).sqlMessage ?? (err as Error).message.slice(0, 200), buffered: this.bufferedRows },
        'ingest flush failed; buffering and retrying',
      );
    this.counters.databaseUp = false;
    this.retryAt = this.opts.now() + this.backoffMs;
    this.backoffMs = Math.min(this.backoffMs * 2, 5000);
  }

  private releaseHeld(): void {
    if (this.bufferedRows + this.inFlightRows > this.opts.maxBufferRows / 2) return;
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
