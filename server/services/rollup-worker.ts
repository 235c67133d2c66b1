import type { Logger } from 'pino';
import type { TelemetryRepository } from '../data/telemetry-repository';
import type { UnitDirectory } from './unit-directory';
import { localDate, utcWindowOfLocalDate } from './local-time';

/** Fills the modelled columns of a closed 15-minute bucket (QuarterModelService). */
export interface QuarterModeller {
  modelQuarter(bucketMs: number, unitIds: number[]): Promise<void>;
}

const MINUTE = 60_000;
const QUARTER = 15 * MINUTE;

/**
 * Keeps the 1-minute, 15-minute and daily rollups current. Stored rows mark their buckets dirty; a pass recomputes
 * each dirty bucket from the level below, so late and out-of-order samples land in the right place.
 */
export class RollupWorker {
  private dirtyMinutes = new Map<number, Set<number>>();
  /** Buckets rolled up but not yet modelled: modelled once closed (their weather is then complete). */
  private unmodelled = new Map<number, Set<number>>();
  private running: Promise<void> | undefined;
  private timer: NodeJS.Timeout | undefined;
  passes = 0;

  constructor(
    private readonly repo: TelemetryRepository,
    private readonly units: UnitDirectory,
    private readonly log: Logger,
    private readonly intervalMs = 2000,
    /** A minute is rolled up once it has been closed this long, so a live minute is scanned once, not every pass [ms]. */
    private readonly graceMs = 5000,
    private readonly now: () => number = Date.now,
    private readonly modeller?: QuarterModeller,
  ) {}

  /** Readings just stored (unit, timestamp [ms]): their minutes are rolled up again. */
  markStored(readings: readonly { unitId: number; tsMs: number }[]): void {
    for (const r of readings) {
      const m = Math.floor(r.tsMs / MINUTE) * MINUTE;
      let set = this.dirtyMinutes.get(m);
      if (!set) this.dirtyMinutes.set(m, (set = new Set()));
      set.add(r.unitId);
    }
  }

  start(): void {
    this.timer = setInterval(() => void this.runOnce().catch((err) => this.log.error({ err }, 'rollup pass failed')), this.intervalMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  /** One pass over every closed dirty minute (tests call it directly). */
  async runOnce(opts: { includeOpenMinutes?: boolean } = {}): Promise<void> {
    while (this.running) await this.running;
    this.running = this.pass(opts.includeOpenMinutes ?? false).finally(() => (this.running = undefined));
    return this.running;
  }

  private async pass(includeOpen: boolean): Promise<void> {
    if (!this.dirtyMinutes.size) return this.modelClosedQuarters();
    // Take the closed minutes; the open ones wait for a later pass (or are taken too at shutdown).
    const ripeBefore = includeOpen ? Infinity : this.now() - MINUTE - this.graceMs;
    const minutes = new Map<number, Set<number>>();
    for (const [m, ids] of this.dirtyMinutes) {
      if (m > ripeBefore) continue;
      minutes.set(m, ids);
      this.dirtyMinutes.delete(m);
    }
    if (!minutes.size) return this.modelClosedQuarters();
    const quarters = new Map<number, Set<number>>();
    try {
      for (const [m, ids] of minutes) {
        await this.repo.rollupMinutes(m, [...ids]);
        const q = Math.floor(m / QUARTER) * QUARTER;
        let set = quarters.get(q);
        if (!set) quarters.set(q, (set = new Set()));
        for (const id of ids) set.add(id);
      }
      const days = new Map<string, Set<number>>(); // "date" → unit ids
      for (const [q, ids] of quarters) {
        await this.repo.rollupQuarter(q, [...ids]);
        for (const id of ids) {
          const tz = this.units.byUnitId(id)?.timeZone ?? 'UTC';
          const d = localDate(q, tz);
          let set = days.get(d);
          if (!set) days.set(d, (set = new Set()));
          set.add(id);
        }
      }
      const daily: { unitId: number; localDate: string; energyWh: number; minutes: number }[] = [];
      for (const [d, ids] of days) {
        // One query per local date for all its units; each unit's quarters are then cut to its own zone's day.
        const { from, to } = utcWindowOfLocalDate(d);
        const sums = new Map<number, { energyWh: number; minutes: number }>([...ids].map((id) => [id, { energyWh: 0, minutes: 0 }]));
        for (const r of await this.repo.quartersBetween([...ids], from, to)) {
          if (localDate(r.bucket.getTime(), this.units.byUnitId(r.unitId)?.timeZone ?? 'UTC') !== d) continue;
          const sum = sums.get(r.unitId)!;
          sum.energyWh += r.energyWh;
          sum.minutes += r.minutes;
        }
        for (const [id, sum] of sums) daily.push({ unitId: id, localDate: d, ...sum });
      }
      await this.repo.upsertDaily(daily);
      if (this.modeller) for (const [q, ids] of quarters) addAll(this.unmodelled, q, ids);
      this.passes++;
    } catch (err) {
      // Put the work back; the next pass retries it.
      for (const [m, ids] of minutes) {
        let set = this.dirtyMinutes.get(m);
        if (!set) this.dirtyMinutes.set(m, (set = new Set()));
        for (const id of ids) set.add(id);
      }
      throw err;
    }
    await this.modelClosedQuarters();
  }

  /** Models each rolled-up bucket once it has closed; a failure is logged and the bucket keeps empty model columns. */
  private async modelClosedQuarters(): Promise<void> {
    if (!this.modeller) return;
    const closedBefore = this.now() - this.graceMs;
    for (const [q, ids] of [...this.unmodelled]) {
      if (q + QUARTER > closedBefore) continue;
      this.unmodelled.delete(q);
      try {
        await this.modeller.modelQuarter(q, [...ids]);
      } catch (err) {
        this.log.warn({ err, bucket: new Date(q).toISOString() }, 'modelling a 15-minute bucket failed');
      }
    }
  }
}

function addAll(map: Map<number, Set<number>>, key: number, ids: Iterable<number>): void {
  let set = map.get(key);
  if (!set) map.set(key, (set = new Set()));
  for (const id of ids) set.add(id);
}
