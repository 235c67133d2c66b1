/**
 * The demo's past: filled on first seeding and, after a restart, over the gap since the last report, so the past never has
 * a hole. The data comes from the simulator's own models through `HistorySource` (the simulator's history stream, run as
 * its own process: the server never imports the simulator) and is bulk-loaded here — never through the live ingest, so
 * it raises no current alarm, ticket or mail. Rollups are the server's own (RollupWorker).
 *
 * Plan for `nowMs` and the newest stored report `lastMs` (null on first seeding):
 *  - full rate for the last `fullRateDays` (from `lastMs` when that is later), the newest day first, before the server
 *    starts; the days before it later, in the background, newest first;
 *  - before the full-rate window, rollup level only (15-minute rows and daily energy) back to `lastMs`, or `rollupDays`
 *    on first seeding; the background days get rollup-level rows first and their raw rows replace them later;
 *  - alarms of the faults and traps in the generated past, all cleared (by the end of their condition plus the kind's
 *    clear delay, at the latest at `nowMs`);
 *  - the statements' model columns: the rollup-level rows carry them from the generator; the full-rate days' buckets are
 *    modelled by `HistoryOptions.modeller` in the background phase (the first phase's own day first).
 */
import type { AlarmKind } from '../../shared/contracts/alarms';
import { quarterOfRow, telemetryOfRow, type HistoryLine } from '../../shared/contracts/history-stream';
import type { Telemetry, UnitEvent, Weather } from '../../shared/contracts/wire';
import type { AlarmRepository } from '../data/alarm-repository';
import type { HistoryProgress, HistoryRepository, QuarterRow } from '../data/history-repository';
import {
  eventRowOf,
  telemetryRowOf,
  weatherRowOf,
  type EventRow,
  type TelemetryRepository,
  type TelemetryRow,
  type WeatherRow,
} from '../data/telemetry-repository';
import type { Alarm } from '../health/alarm-types';
import { DEFAULT_HEALTH_SETTINGS, type HealthSettings } from '../health/health-settings';
import { readingsSnapshot } from '../health/unit-sample';
import type { QuarterModeller, RollupWorker } from './rollup-worker';
import type { UnitDirectory, UnitInfo } from './unit-directory';

const MINUTE_MS = 60_000;
const QUARTER_MS = 15 * MINUTE_MS;
const DAY_MS = 86_400_000;
/** A gap shorter than this is no gap: units report every few seconds [ms]. */
const MIN_GAP_MS = 10_000;

export interface HistoryRequest {
  mode: 'full' | 'rollups';
  fromMs: number;
  toMs: number;
  seed: string;
  serials: string[];
  faults: boolean;
}

/** Where the generated past comes from (the server script runs the simulator's history stream as a child process). */
export interface HistorySource {
  run(req: HistoryRequest): AsyncIterable<HistoryLine>;
}

export interface HistoryOptions {
  seed: string;
  /** Days at full rate (BW_DEMO_HISTORY_DAYS); 0 = none. */
  fullRateDays: number;
  /** Days of rollup-level past on first seeding (13 months by default). */
  rollupDays: number;
  /** Inject the history's faults (false: only what the sky itself causes). */
  faults: boolean;
  /** Only these units (tests); default every unit the server knows. */
  serials?: readonly string[];
  /** Progress lines ("history: day 3 of 7"). */
  log: (line: string) => void;
  settings?: HealthSettings;
  /**
   * Models the full-rate days' 15-minute buckets as the live rollup worker does (QuarterModelService: a sky per site and
   * bucket, ≈ 12 ms each), in the background phase, so the first phase does not wait for it. Without it those buckets
   * keep empty model columns (the rollup-level past comes modelled by the generator).
   */
  modeller?: QuarterModeller;
}

export interface HistoryPlan {
  nowMs: number;
  /** Rollup-level window (empty when from ≥ to). */
  rollupFromMs: number;
  rollupToMs: number;
  /** Full-rate window before the server starts. */
  firstFromMs: number;
  /** Full-rate window left for the background (empty when from ≥ to). */
  backgroundFromMs: number;
  backgroundToMs: number;
  daysTotal: number;
}

export interface LoadCounts {
  rawRows: number;
  rollupRows: number;
  events: number;
  weather: number;
  alarms: number;
  /** 15-minute buckets (units × buckets) given their model columns. */
  modelled: number;
}

const floorQ = (ms: number) => Math.floor(ms / QUARTER_MS) * QUARTER_MS;
const ceilQ = (ms: number) => Math.ceil(ms / QUARTER_MS) * QUARTER_MS;

/** What to fill for `nowMs` given the newest stored report (null: nothing stored yet); null when there is no gap. */
export function planHistory(
  nowMs: number,
  lastMs: number | null,
  o: Pick<HistoryOptions, 'fullRateDays' | 'rollupDays'>,
): HistoryPlan | null {
  if (lastMs !== null && nowMs - lastMs < MIN_GAP_MS) return null;
  const fullLimit = o.fullRateDays > 0 ? ceilQ(nowMs - o.fullRateDays * DAY_MS) : nowMs;
  const fullFrom = lastMs === null ? fullLimit : Math.max(lastMs + 1, fullLimit);
  const firstFrom = Math.max(fullFrom, Math.min(nowMs, floorQ(nowMs - DAY_MS)));
  const rollupFrom = lastMs === null ? floorQ(nowMs - o.rollupDays * DAY_MS) : ceilQ(lastMs + 1);
  // Rollup-level rows also cover the background days until their raw rows arrive.
  const rollupTo = fullFrom < firstFrom ? firstFrom : Math.min(firstFrom, floorQ(fullFrom));
  return {
    nowMs,
    rollupFromMs: rollupFrom,
    rollupToMs: Math.max(rollupFrom, rollupTo),
    firstFromMs: firstFrom,
    backgroundFromMs: fullFrom,
    backgroundToMs: Math.max(fullFrom, firstFrom),
    daysTotal: (firstFrom < nowMs ? 1 : 0) + Math.ceil(Math.max(0, firstFrom - fullFrom) / DAY_MS),
  };
}

/** Alarm kind of each truth record kind (wind stows are events, not alarms). */
const ALARM_OF: Record<string, AlarmKind | undefined> = {
  trap: 'trap',
  stall: 'stall',
  drift: 'drift',
  'dead-detector': 'drift',
  hunting: 'hunting',
  'comms-loss': 'comms',
  soiling: 'soiling',
};

const WORDS: Record<string, { severity: Alarm['severity']; message: string; advice: string }> = {
  trap: {
    severity: 'P3',
    message: 'Settled on a local maximum well below the best reachable orientation.',
    advice: 'Send a scan, then go to the brightest orientation it finds; a wider detector tilt keeps the unit off such peaks.',
  },
  stall: {
    severity: 'P2',
    message: 'An axis did not follow its command (drive fault).',
    advice: 'Check the drive, gearbox and limit switches for obstruction or wear; put the unit on hold before anyone touches it.',
  },
  drift: {
    severity: 'P3',
    message: 'A detector of a pair read away from its partner (drift or a dead detector).',
    advice: 'Clean and inspect the detector and its connector; recalibrate the pair or replace the detector.',
  },
  hunting: {
    severity: 'P3',
    message: 'The unit kept reversing without getting anywhere (hunting).',
    advice: 'Lower the gain or widen the deadband of the unit; check the actuator for backlash.',
  },
  comms: {
    severity: 'P3',
    message: 'No reports from the unit (its readings were forwarded later).',
    advice: 'Check the unit’s link and power; readings it stored meanwhile arrive when the link returns.',
  },
  soiling: {
    severity: 'P4',
    message: 'Output per in-plane irradiance fell below the unit’s clean reference (soiling).',
    advice: 'Schedule a clean of the module and detectors.',
  },
};

function timingOf(kind: AlarmKind, s: HealthSettings): { delayOnMs: number; clearDelayMs: number } {
  const on: Record<string, number> = {
    trap: s.trapDelayOnMin,
    stall: s.stallDelayOnMin,
    drift: s.driftDelayOnMin,
    hunting: s.huntingDelayOnMin,
    comms: s.commsDelayOnMin,
    soiling: s.soilingDelayOnMin,
  };
  const off: Record<string, number> = {
    trap: s.trapClearDelayMin,
    stall: s.stallClearDelayMin,
    drift: s.driftClearDelayMin,
    hunting: s.huntingClearDelayMin,
    comms: s.commsClearDelayMin,
    soiling: s.soilingClearDelayMin,
  };
  return { delayOnMs: (on[kind] ?? 10) * MINUTE_MS, clearDelayMs: (off[kind] ?? 10) * MINUTE_MS };
}

/**
 * The alarms the truth records of a generated window stand for: raised after the kind's delay-on (a record shorter than
 * that raises nothing), cleared after the clear delay, at the latest at `nowMs`. `readingAt` gives the unit's report at
 * the raise, when there is one, for the evidence.
 */
export function alarmsOfTruth(
  truth: { serial: string; fault: string; start: string; end: string | null }[],
  units: (serial: string) => UnitInfo | undefined,
  nowMs: number,
  settings: HealthSettings,
  readingAt: (unitId: number, atMs: number) => Telemetry | undefined,
): Alarm[] {
  const out: Alarm[] = [];
  for (const r of truth) {
    const kind = ALARM_OF[r.fault];
    const u = units(r.serial);
    if (!kind || !u) continue;
    const startMs = Date.parse(r.start);
    const endMs = r.end === null ? nowMs : Math.min(nowMs, Date.parse(r.end));
    const { delayOnMs, clearDelayMs } = timingOf(kind, settings);
    if (endMs - startMs < delayOnMs) continue;
    const raisedMs = startMs + delayOnMs;
    const t = readingAt(u.id, raisedMs);
    const words = WORDS[kind]!;
    out.push({
      key: `history:${u.id}:${kind}:${startMs}`,
      unitId: u.id,
      serial: u.serial,
      siteId: u.siteId,
      kind,
      state: 'cleared',
      severity: words.severity,
      message: words.message,
      advice: words.advice,
      evidence: {
        generatedPast: true,
        condition: r.fault,
        conditionStart: r.start,
        conditionEnd: new Date(endMs).toISOString(),
        ...(t ? { readings: readingsSnapshot(t) } : {}),
      },
      firstSeenMs: startMs,
      raisedMs,
      lastSeenMs: endMs,
      clearedMs: Math.min(nowMs, endMs + clearDelayMs),
      clearReason: 'condition ended',
    });
  }
  return out;
}

/** Loads the generated past. */
export class DemoHistory {
  private readonly settings: HealthSettings;

  constructor(
    private readonly repo: HistoryRepository,
    private readonly telemetry: TelemetryRepository,
    private readonly alarms: AlarmRepository,
    private readonly rollups: RollupWorker,
    private readonly units: UnitDirectory,
    private readonly source: HistorySource,
    private readonly o: HistoryOptions,
  ) {
    this.settings = o.settings ?? DEFAULT_HEALTH_SETTINGS;
  }

  /** The units whose past is generated. */
  private chosen(): UnitInfo[] {
    const only = this.o.serials ? new Set(this.o.serials) : null;
    return this.units.all().filter((u) => !only || only.has(u.serial));
  }

  private unitIds(): number[] {
    return this.chosen().map((u) => u.id);
  }

  /**
   * The first phase (before the server starts): the rollup-level past, the newest day at full rate, their alarms. Returns
   * the plan (null when there is no gap) and what was stored.
   */
  async fill(nowMs: number): Promise<{ plan: HistoryPlan | null; counts: LoadCounts; progressId?: number }> {
    await this.units.load();
    const counts: LoadCounts = { rawRows: 0, rollupRows: 0, events: 0, weather: 0, alarms: 0, modelled: 0 };
    // A first phase that did not finish (stopped or failed) is done again first: its plan gives the same rows again, and
    // the keys make what is already there harmless. Only then is the gap since its end measured.
    for (const p of await this.repo.unfinished()) {
      if (p.state !== 'loading' && p.state !== 'failed') continue;
      const again = planHistory(p.plannedAt.getTime(), p.lastReportAt?.getTime() ?? null, this.o);
      this.o.log(`history: resuming the fill planned for ${p.plannedAt.toISOString()}`);
      if (again) await this.firstPhase(p.id, again, counts);
      else await this.repo.updateProgress(p.id, { state: 'done', message: 'complete' });
    }
    const lastMs = await this.repo.latestReportMs(this.unitIds());
    const plan = planHistory(nowMs, lastMs, this.o);
    if (!plan) {
      this.o.log('history: no gap to fill');
      return { plan, counts };
    }
    const bg = plan.backgroundFromMs < plan.backgroundToMs;
    const progressId = await this.repo.startProgress({
      plannedAt: new Date(nowMs),
      lastReportAt: lastMs === null ? null : new Date(lastMs),
      state: 'loading',
      daysTotal: plan.daysTotal,
      daysDone: 0,
      backgroundFrom: bg ? new Date(plan.backgroundFromMs) : null,
      backgroundTo: bg ? new Date(plan.backgroundToMs) : null,
      message: `loading the past ${lastMs === null ? 'of the demo' : `since ${new Date(lastMs).toISOString()}`}`,
    });
    await this.firstPhase(progressId, plan, counts);
    return { plan, counts, progressId };
  }

  /** The rollup-level past and the newest full-rate day of a plan, side by side, then the progress row says what is left. */
  private async firstPhase(progressId: number, plan: HistoryPlan, counts: LoadCounts): Promise<void> {
    const nowMs = plan.nowMs;
    const bg = plan.backgroundFromMs < plan.backgroundToMs;
    try {
      // The two run side by side (each its own simulator process); the rollup-level days are summed as soon as they are in.
      const t0 = Date.now();
      const secs = () => `${((Date.now() - t0) / 1000).toFixed(1)} s`;
      const jobs: Promise<LoadCounts>[] = [];
      const rollupLevel = plan.rollupFromMs < plan.rollupToMs;
      if (rollupLevel)
        jobs.push(
          this.loadRollups(plan.rollupFromMs, plan.rollupToMs, nowMs).then(async (c) => {
            await this.rollups.rebuildDays(this.unitIds(), new Date(plan.rollupFromMs), new Date(plan.rollupToMs));
            this.o.log(`history: ${c.rollupRows} rollup-level rows since ${new Date(plan.rollupFromMs).toISOString()} in ${secs()}`);
            return c;
          }),
        );
      if (plan.firstFromMs < nowMs) {
        this.o.log(
          plan.daysTotal > 1 || nowMs - plan.firstFromMs > 3_600_000
            ? `history: day 1 of ${plan.daysTotal} (full rate)`
            : `history: the last ${Math.round((nowMs - plan.firstFromMs) / 1000)} s at full rate`,
        );
        jobs.push(
          this.loadFullRate(plan.firstFromMs, nowMs, nowMs, false).then((c) => {
            this.o.log(`history: ${c.rawRows} reports at full rate in ${secs()}`);
            return c;
          }),
        );
      }
      for (const c of await Promise.all(jobs)) addCounts(counts, c);
      // The day where the two meet may have been summed before the other side's quarters were in.
      if (rollupLevel && plan.firstFromMs < nowMs)
        await this.rollups.rebuildDays(this.unitIds(), new Date(plan.firstFromMs - QUARTER_MS), new Date(plan.firstFromMs + QUARTER_MS));
      const done = plan.firstFromMs < nowMs ? 1 : 0;
      await this.repo.updateProgress(progressId, {
        state: bg ? 'background' : 'done',
        daysDone: done,
        message: bg ? `${done} of ${plan.daysTotal} days at full rate; the rest fills in the background` : 'complete',
      });
    } catch (err) {
      await this.repo.updateProgress(progressId, { state: 'failed', message: `failed: ${(err as Error).message}` });
      throw err;
    }
  }

  /** Fills the full-rate days left by earlier fills (interrupted ones too), newest day first; returns what was stored. */
  async background(nowMs: number = Date.now()): Promise<LoadCounts> {
    await this.units.load();
    const counts: LoadCounts = { rawRows: 0, rollupRows: 0, events: 0, weather: 0, alarms: 0, modelled: 0 };
    // The full-rate buckets the first phase left unmodelled (this start's and any earlier start's), newest first.
    counts.modelled += await this.modelFullRate(nowMs - (Math.max(1, this.o.fullRateDays) + 1) * DAY_MS, nowMs);
    for (const p of await this.repo.unfinished()) {
      if (p.state !== 'background' || !p.backgroundFrom || !p.backgroundTo) continue;
      await this.backgroundOf(p, counts);
    }
    return counts;
  }

  private async backgroundOf(p: HistoryProgress, counts: LoadCounts): Promise<void> {
    const from = p.backgroundFrom!.getTime();
    let to = p.backgroundTo!.getTime();
    let done = p.daysDone;
    try {
      while (to > from) {
        const chunkFrom = Math.max(from, to - DAY_MS);
        this.o.log(`history: day ${done + 1} of ${p.daysTotal} (full rate)`);
        addCounts(counts, await this.loadFullRate(chunkFrom, to, p.plannedAt.getTime(), true));
        to = chunkFrom;
        done++;
        await this.repo.updateProgress(p.id, {
          daysDone: done,
          backgroundTo: new Date(to),
          state: to > from ? 'background' : 'done',
          message: to > from ? `${done} of ${p.daysTotal} days at full rate` : 'complete',
        });
      }
      this.o.log(`history: complete (${done} of ${p.daysTotal} days at full rate)`);
    } catch (err) {
      await this.repo.updateProgress(p.id, { message: `background fill stopped: ${(err as Error).message}; it resumes at the next start` });
      throw err;
    }
  }

  /**
   * One full-rate window [fromMs, toMs): raw reports, events and weather bulk-loaded while the simulator generates them,
   * then the window's rollups by the server's own rollup code (rollup-level rows there removed first), then its alarms.
   */
  async loadFullRate(fromMs: number, toMs: number, nowMs: number, replacesRollups: boolean): Promise<LoadCounts> {
    const counts: LoadCounts = { rawRows: 0, rollupRows: 0, events: 0, weather: 0, alarms: 0, modelled: 0 };
    const bySerial = new Map(this.chosen().map((u) => [u.serial, u]));
    const ids = [...bySerial.values()].map((u) => u.id);
    const readings = new Map<number, Telemetry[]>();
    const truth: Extract<HistoryLine, { k: 'truth' }>[] = [];
    const writer = new BoundedWriter(2);
    const raw = new RowBatch<TelemetryRow>(25_000, writer, async (rows) => void (counts.rawRows += await this.repo.insertTelemetry(rows)));
    const events = new RowBatch<EventRow>(
      1000,
      writer,
      async (rows) => void (counts.events += (await this.telemetry.insertEvents(rows)).count),
    );
    const weather = new RowBatch<WeatherRow>(10_000, writer, async (rows) => void (counts.weather += await this.repo.insertWeather(rows)));
    const flush = async (final: boolean) => {
      await raw.flush(final);
      await events.flush(final);
      await weather.flush(final);
    };
    for await (const line of this.source.run({
      mode: 'full',
      fromMs,
      toMs,
      seed: this.o.seed,
      serials: [...bySerial.keys()],
      faults: this.o.faults,
    })) {
      if (line.k === 'truth') truth.push(line);
      if (line.k !== 'm' && line.k !== 't') continue;
      const u = bySerial.get(line.serial);
      if (!u) continue;
      if (line.k === 't') {
        const t = telemetryOfRow(line.r);
        const tsMs = Date.parse(t.ts);
        raw.push(telemetryRowOf(u.id, t, tsMs, Math.max(tsMs, line.sentMs)));
        // One report a minute is kept for the evidence of the window's alarms.
        let list = readings.get(u.id);
        if (!list) readings.set(u.id, (list = []));
        const prev = list.at(-1);
        if (!prev || Math.floor(Date.parse(prev.ts) / MINUTE_MS) !== Math.floor(tsMs / MINUTE_MS)) list.push(t);
      } else if (line.leaf === 'events') {
        const e = line.payload as UnitEvent;
        events.push(eventRowOf(u.id, e, Date.parse(e.ts)));
      } else if (line.leaf === 'weather' && u.weatherStation) {
        const w = line.payload as Weather;
        weather.push(weatherRowOf(u.siteId, w, Date.parse(w.ts)));
      }
      await flush(false);
    }
    await flush(true);
    await writer.drain();
    if (replacesRollups) await this.repo.deleteQuarters(ids, new Date(ceilQ(fromMs)), new Date(toMs));
    await this.rollups.rebuildRange(ids, new Date(fromMs), new Date(toMs));
    // Background days are modelled at once (they replaced modelled rollup-level rows); the first phase's day later.
    if (replacesRollups) counts.modelled += await this.modelFullRate(fromMs, toMs);
    const at = (unitId: number, atMs: number) => {
      const list = readings.get(unitId);
      if (!list?.length) return undefined;
      let lo = 0;
      let hi = list.length - 1;
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1;
        if (Date.parse(list[mid]!.ts) <= atMs) lo = mid;
        else hi = mid - 1;
      }
      return list[lo];
    };
    counts.alarms += await this.storeAlarms(
      alarmsOfTruth(truth, (s) => bySerial.get(s), nowMs, this.settings, at),
      fromMs,
      toMs,
    );
    return counts;
  }

  /** The rollup-level past [fromMs, toMs): 15-minute rows, weather station readings and the faults' alarms. */
  async loadRollups(fromMs: number, toMs: number, nowMs: number): Promise<LoadCounts> {
    const counts: LoadCounts = { rawRows: 0, rollupRows: 0, events: 0, weather: 0, alarms: 0, modelled: 0 };
    const bySerial = new Map(this.chosen().map((u) => [u.serial, u]));
    const truth: Extract<HistoryLine, { k: 'truth' }>[] = [];
    const writer = new BoundedWriter(2);
    const quarters = new RowBatch<QuarterRow>(
      50_000,
      writer,
      async (rows) => void (counts.rollupRows += await this.repo.insertQuarters(rows)),
    );
    const weather = new RowBatch<WeatherRow>(10_000, writer, async (rows) => void (counts.weather += await this.repo.insertWeather(rows)));
    const flush = async (final: boolean) => {
      await quarters.flush(final);
      await weather.flush(final);
    };
    for await (const line of this.source.run({
      mode: 'rollups',
      fromMs,
      toMs,
      seed: this.o.seed,
      serials: [...bySerial.keys()],
      faults: this.o.faults,
    })) {
      if (line.k === 'truth') truth.push(line);
      else if (line.k === 'q') {
        const q = quarterOfRow(line.r);
        const u = bySerial.get(q.serial);
        if (!u) continue;
        quarters.push({
          unitId: u.id,
          bucket: new Date(q.bucketMs),
          minutes: q.minutes,
          samples: q.samples,
          poaAvgWm2: q.poaAvgWm2,
          poaMaxWm2: q.poaMaxWm2,
          dcPowerAvgW: q.dcPowerAvgW,
          energyWh: q.energyWh,
          moduleTempC: q.moduleTempC,
          tiltDeg: q.tiltDeg,
          azimuthDeg: q.azimuthDeg,
          // The rollup-level past has no scans, holds or faults reported as a mode (downtime is missing minutes).
          modeMinutes: [q.seekingMin, q.settledMin, 0, q.stowedMin, 0, 0],
          modelUnitWm2: q.modelUnitWm2,
          modelBestWm2: q.modelBestWm2,
          modelFixedWm2: q.modelFixedWm2,
          modelSunWm2: q.modelSunWm2,
        });
      } else if (line.k === 'w') {
        const u = bySerial.get(line.serial);
        if (!u?.weatherStation) continue;
        const { k: _k, serial: _s, tsMs, ...w } = line;
        weather.push(weatherRowOf(u.siteId, { v: 1, ts: new Date(tsMs).toISOString(), ...w }, tsMs));
      } else continue;
      await flush(false);
    }
    await flush(true);
    await writer.drain();
    counts.alarms += await this.storeAlarms(
      alarmsOfTruth(
        truth,
        (s) => bySerial.get(s),
        nowMs,
        this.settings,
        () => undefined,
      ),
      fromMs,
      toMs,
    );
    return counts;
  }

  /**
   * Models the closed buckets in [fromMs, toMs) that were rolled up from raw rows but have no model columns yet, newest
   * first, as the live rollup worker does; returns how many unit buckets it modelled (0 without a modeller).
   */
  async modelFullRate(fromMs: number, toMs: number): Promise<number> {
    if (!this.o.modeller) return 0;
    const pending = await this.repo.unmodelledQuarters(this.unitIds(), new Date(ceilQ(fromMs)), new Date(floorQ(toMs)));
    let n = 0;
    for (const { bucket, unitIds } of pending) {
      await this.o.modeller.modelQuarter(bucket.getTime(), unitIds);
      n += unitIds.length;
    }
    if (n) this.o.log(`history: ${n} full-rate buckets modelled`);
    return n;
  }

  /** Stores alarms not stored yet (same unit, kind and first-seen time): a re-run adds none twice. */
  private async storeAlarms(list: Alarm[], fromMs: number, toMs: number): Promise<number> {
    if (!list.length) return 0;
    const ids = [...new Set(list.map((a) => a.unitId!))];
    const have = await this.repo.alarmKeys(ids, new Date(fromMs - DAY_MS), new Date(toMs));
    let n = 0;
    for (const a of list) {
      if (have.has(`${a.unitId}|${a.kind}|${a.firstSeenMs}`)) continue;
      await this.alarms.insert(a);
      n++;
    }
    return n;
  }

  latest(): Promise<HistoryProgress | undefined> {
    return this.repo.latest();
  }
}

function addCounts(a: LoadCounts, b: LoadCounts): void {
  a.rawRows += b.rawRows;
  a.rollupRows += b.rollupRows;
  a.events += b.events;
  a.weather += b.weather;
  a.alarms += b.alarms;
  a.modelled += b.modelled;
}

/** Runs writes with at most `limit` in flight: `add` waits for a free place, `drain` for all; the first error is thrown. */
/** Rows gathered for one bulk insert, handed to the writer once `limit` are waiting (and whatever is left at the end). */
class RowBatch<T> {
  private rows: T[] = [];

  constructor(
    private readonly limit: number,
    private readonly writer: BoundedWriter,
    private readonly insert: (rows: T[]) => Promise<void>,
  ) {}

  push(row: T): void {
    this.rows.push(row);
  }

  async flush(final: boolean): Promise<void> {
    if (this.rows.length < this.limit && !(final && this.rows.length)) return;
    const rows = this.rows;
    this.rows = [];
    await this.writer.add(() => this.insert(rows));
  }
}

class BoundedWriter {
  private readonly inFlight = new Set<Promise<void>>();
  private error: unknown;

  constructor(private readonly limit: number) {}

  async add(job: () => Promise<void>): Promise<void> {
    while (this.inFlight.size >= this.limit) await Promise.race(this.inFlight);
    if (this.error) throw this.error;
    const p: Promise<void> = job()
      .catch((err) => void (this.error ??= err))
      .finally(() => this.inFlight.delete(p));
    this.inFlight.add(p);
  }

  async drain(): Promise<void> {
    await Promise.all(this.inFlight);
    if (this.error) throw this.error;
  }
}
