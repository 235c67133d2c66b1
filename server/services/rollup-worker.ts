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
/** Longest run of consecutive local dates summed from one read of the quarter-hour rows. */
const DAYS_PER_READ = 14;

/** The calendar date after `date` (YYYY-MM-DD). */
const nextDate = (date: string) => new Date(Date.parse(`${date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

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
  private readonly rolledListeners: ((quarters: ReadonlyMap<number, ReadonlySet<number>>) => void)[] = [];
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

  /** Called after each pass with the 15-minute buckets it rewrote (bucket start [ms] → unit ids), e.g. for late data. */
  onRolled(listener: (quarters: ReadonlyMap<number, ReadonlySet<number>>) => void): void {
    this.rolledListeners.push(listener);
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

  /**
   * Rebuilds every rollup of some units over [from, to) from their raw rows: the minutes in one statement, then each
   * quarter and local day touched, exactly as a pass does (bulk-loaded history uses it instead of marking each row).
   */
  async rebuildRange(unitIds: number[], from: Date, to: Date): Promise<void> {
    if (!unitIds.length || !(from < to)) return;
    const m0 = Math.floor(from.getTime() / MINUTE) * MINUTE;
    await this.repo.rollupMinuteRange(unitIds, new Date(m0), to);
    const quarters = new Map<number, Set<number>>();
    for (let q = Math.floor(m0 / QUARTER) * QUARTER; q < to.getTime(); q += QUARTER) {
      await this.repo.rollupQuarter(q, unitIds);
      quarters.set(q, new Set(unitIds));
    }
    await this.rollupDays(quarters);
  }

  /** Recomputes the daily energy of some units for every local day that has a quarter in [from, to) (quarters stored directly). */
  async rebuildDays(unitIds: number[], from: Date, to: Date): Promise<void> {
    if (!unitIds.length || !(from < to)) return;
    const quarters = new Map<number, Set<number>>();
    // One quarter per hour is enough to name every local day (zones are whole or half hours off UTC).
    for (let q = Math.floor(from.getTime() / QUARTER) * QUARTER; q < to.getTime(); q += 2 * QUARTER) quarters.set(q, new Set(unitIds));
    await this.rollupDays(quarters);
  }

  /** Sums the quarters of each touched local day into the daily energy (one query per date for all its units). */
  private async rollupDays(quarters: Map<number, Set<number>>): Promise<void> {
    // Units share zones and quarters: each (zone, instant) is formatted once.
    const memo = new Map<string, string>();
    const dateOf = (ms: number, unitId: number) => {
      const tz = this.units.byUnitId(unitId)?.timeZone ?? 'UTC';
      const key = `${tz}|${ms}`;
      let d = memo.get(key);
      if (d === undefined) memo.set(key, (d = localDate(ms, tz)));
      return d;
    };
    const days = new Map<string, Set<number>>(); // "date" → unit ids
    for (const [q, ids] of quarters) {
      for (const id of ids) {
        const d = dateOf(q, id);
        let set = days.get(d);
        if (!set) days.set(d, (set = new Set()));
        set.add(id);
      }
    }
    // Runs of consecutive dates (up to DAYS_PER_READ) share one read of their quarters; each unit's quarters are cut to
    // its own zone's days.
    const dates = [...days.keys()].sort();
    for (let i = 0; i < dates.length;) {
      let j = i;
      while (j + 1 < dates.length && j + 1 - i < DAYS_PER_READ && nextDate(dates[j]!) === dates[j + 1]) j++;
      const run = dates.slice(i, j + 1);
      i = j + 1;
      const sums = new Map<string, { unitId: number; localDate: string; energyWh: number; minutes: number }>();
      const ids = new Set<number>();
      for (const d of run)
        for (const id of days.get(d)!) {
          ids.add(id);
          sums.set(`${id}|${d}`, { unitId: id, localDate: d, energyWh: 0, minutes: 0 });
        }
      const rows = await this.repo.quartersBetween([...ids], utcWindowOfLocalDate(run[0]!).from, utcWindowOfLocalDate(run.at(-1)!).to);
      for (const r of rows) {
        const sum = sums.get(`${r.unitId}|${dateOf(r.bucket.getTime(), r.unitId)}`);
        if (!sum) continue;
        sum.energyWh += r.energyWh;
        sum.minutes += r.minutes;
      }
      await this.repo.upsertDaily([...sums.values()]);
    }
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
      for (const [q, ids] of quarters) await this.repo.rollupQuarter(q, [...ids]);
      await this.rollupDays(quarters);
      if (this.modeller) for (const [q, ids] of quarters) addAll(this.unmodelled, q, ids);
      this.passes++;
      for (const l of this.rolledListeners) l(quarters);
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
