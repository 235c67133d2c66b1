/**
 * Fleet health on the server: feeds the health engine (server/health) from the ingest listeners — telemetry, events,
 * status and the sites' weather-station readings, each as it is stored — and runs its periodic checks. Its collaborators
 * each do one job: `SiteModelCache` gives the engine each site's model, `AlarmStore` keeps and pushes its alarms,
 * `HealthSettingsService` its per-site settings.
 *
 * Tickets: `onAlarmRaised(listener)` is the hook for the tickets service (open a ticket for alarms at or above a
 * severity); nothing subscribes to it yet.
 */
import type { Logger } from 'pino';
import type { AlarmView } from '../../shared/contracts/alarms';
import type { Telemetry, UnitEvent, UnitStatus, Weather } from '../../shared/contracts/wire';
import { HealthEngine } from '../health/health-engine';
import type { SiteModel } from '../health/site-model';
import { latestTrapReadings, trapUnderModel, type TrapVerdict } from '../health/trap-reassess';
import type { AlarmStore } from './alarm-store';
import type { HealthSettingsService } from './health-settings-service';
import type { LiveHub } from './live-hub';
import type { SiteModelCache, SiteModelCacheOptions } from './site-model-cache';
import { unitRefOf, type UnitDirectory, type UnitInfo } from './unit-directory';
import type { UnitRef } from '../health/unit-sample';

/** Units' last-heard times shared between servers (server/data/unit-heard-repository.ts). */
export interface SharedHeard {
  write(rows: readonly { unitId: number; heardMs: number; tsMs: number; offlineMs: number | null }[]): Promise<void>;
  since(
    from: Date | null,
  ): Promise<{ rows: { unitId: number; heardMs: number; tsMs: number; offlineMs: number | null }[]; newestWrite: Date | null }>;
}

/** Re-read this much before the newest shared write seen, so a write that committed late is not missed [ms]. */
const HEARD_OVERLAP_MS = 10_000;

export interface HealthServiceOptions extends SiteModelCacheOptions {
  /** Comms check interval [ms]. */
  tickMs: number;
  /** After a restart, how long units last heard before it get to reconnect before the comms watch judges them [ms]. */
  restoreGraceMs: number;
}

export const DEFAULT_HEALTH_SERVICE_OPTIONS: HealthServiceOptions = {
  now: Date.now,
  tickMs: 5000,
  modelRefreshMs: 5 * 60_000,
  modelMaxAgeMs: 15 * 60_000,
  maxTiltDeg: 85,
  restoreGraceMs: 60_000,
};

export class HealthService {
  readonly engine: HealthEngine;
  private readonly opts: HealthServiceOptions;
  private timer: NodeJS.Timeout | undefined;
  /** This server runs the comms watch (it leads: server/services/leadership.ts); the others only feed their engine. */
  private watching = false;
  private cycling = false;
  /** What this server heard since its last shared write (unit id → latest). */
  private heardHere = new Map<number, { unitId: number; heardMs: number; tsMs: number; offlineMs: number | null }>();
  private heardFrom: Date | null = null;
  /** The engine's reference of each unit, made again only when what it holds changed (the engine keys state on it). */
  private readonly refs = new Map<number, UnitRef>();

  constructor(
    private readonly store: AlarmStore,
    models: SiteModelCache,
    private readonly settings: HealthSettingsService,
    live: LiveHub,
    private readonly log: Logger,
    opts: Partial<HealthServiceOptions> = {},
    /** Several servers: what each heard goes through the database to the one running the comms watch. */
    private readonly shared?: { heard: SharedHeard; units: UnitDirectory },
  ) {
    this.opts = { ...DEFAULT_HEALTH_SERVICE_OPTIONS, ...opts };
    this.engine = new HealthEngine({
      now: this.opts.now,
      models: models.provider(),
      settingsFor: (siteId) => this.settings.forSite(siteId),
      listeners: {
        raised: (a) => this.store.raised(a),
        updated: (a) => this.store.updated(a),
        cleared: (a) => this.store.cleared(a),
        stow: (e) =>
          live.publishAlarm(e.unitId, {
            kind: 'wind-stow',
            severity: 'P4',
            state: 'event',
            serial: e.serial,
            siteId: e.siteId,
            at: new Date(e.atMs).toISOString(),
            event: e.kind,
            message: e.message,
          }),
      },
    });
  }

  async start(): Promise<void> {
    await this.settings.load();
    this.timer = setInterval(() => void this.cycle(), this.opts.tickMs);
    this.timer.unref();
  }

  /**
   * Runs the comms watch here or not (one server at a time: the leader). A server that starts watching first reads
   * every unit's shared last-heard time, so it judges units whose reports went to other servers.
   */
  watch(on: boolean): void {
    this.watching = on;
    if (on) this.heardFrom = null;
  }

  get isWatching(): boolean {
    return this.watching;
  }

  /** One timer beat: share what was heard here, then (the watching server) take in the others' and judge. */
  async cycle(): Promise<void> {
    if (this.cycling) return;
    this.cycling = true;
    try {
      if (this.shared) {
        const rows = [...this.heardHere.values()];
        this.heardHere = new Map();
        await this.shared.heard.write(rows).catch((err) => {
          // Kept for the next beat (newer news of a unit replaces it there).
          for (const r of rows) if (!this.heardHere.has(r.unitId)) this.heardHere.set(r.unitId, r);
          this.log.warn({ err }, 'sharing last-heard times failed');
        });
        if (this.watching) await this.takeInShared();
      }
      if (this.watching) this.tick();
      else this.engine.book.pruneCleared();
    } finally {
      this.cycling = false;
    }
  }

  private async takeInShared(): Promise<void> {
    const { heard, units } = this.shared!;
    let read;
    try {
      read = await heard.since(this.heardFrom && new Date(this.heardFrom.getTime() - HEARD_OVERLAP_MS));
    } catch (err) {
      this.log.warn({ err }, 'reading shared last-heard times failed');
      return;
    }
    for (const r of read.rows) {
      const unit = units.byUnitId(r.unitId);
      if (unit) this.guard(() => this.engine.heardElsewhere(this.refOf(unit), r.heardMs, r.tsMs, r.offlineMs));
    }
    if (read.newestWrite) this.heardFrom = read.newestWrite;
  }

  /** `ts`: the message's own time (ISO), else now. Parsed only when servers share what they heard (hot path). */
  private noteHeard(unitId: number, ts: string | undefined, offline = false): void {
    if (!this.shared) return;
    const now = this.opts.now();
    const tsMs = ts ? Date.parse(ts) : now;
    const was = this.heardHere.get(unitId);
    this.heardHere.set(unitId, {
      unitId,
      heardMs: offline ? (was?.heardMs ?? now) : now,
      tsMs: Math.max(tsMs, was?.tsMs ?? 0),
      offlineMs: offline ? now : null,
    });
  }

  /** Units' last stored messages at start-up ([unit, arrival ms, unit timestamp ms]): the comms watch covers them at once. */
  restore(last: [UnitInfo, number, number][]): void {
    const graceUntil = this.opts.now() + this.opts.restoreGraceMs;
    for (const [unit, arrivalMs, tsMs] of last) this.engine.restore(this.refOf(unit), arrivalMs, tsMs, graceUntil);
  }

  async stop(): Promise<void> {
    clearInterval(this.timer);
    await this.store.settle();
  }

  /** The hook for tickets: called once per raised alarm (after it is stored). Returns an unsubscribe function. */
  onAlarmRaised(listener: (a: AlarmView) => void): () => void {
    return this.store.onRaised(listener);
  }

  // ---- ingest listeners
  telemetry(unit: UnitInfo, t: Telemetry): void {
    this.noteHeard(unit.id, t.ts);
    this.guard(() => this.engine.telemetry(this.refOf(unit), t));
  }

  event(unit: UnitInfo, e: UnitEvent): void {
    this.noteHeard(unit.id, e.ts);
    this.guard(() => this.engine.event(this.refOf(unit), e));
  }

  status(unit: UnitInfo, st: UnitStatus): void {
    this.noteHeard(unit.id, st.ts, !st.online);
    this.guard(() => this.engine.status(this.refOf(unit), st));
  }

  /** A reading of the site's weather station, from the unit that carries it: the stow watch hears it at once. */
  weather(unit: UnitInfo, w: Weather): void {
    this.guard(() => this.engine.weather(unit.siteId, w));
  }

  /** One pass of the periodic work (also called by tests). */
  tick(): void {
    this.guard(() => this.engine.tick());
    this.engine.book.pruneCleared();
  }

  /**
   * Judges the site's open trap alarms again against a new model (its survey changed): each alarm's latest readings
   * against `modelAt` their instant (server/health/trap-reassess.ts). Those the new model would not raise are cleared now
   * with `reason(verdict)`; the rest stay open and the detector goes on with the new model.
   */
  async reassessTraps(
    siteId: number,
    modelAt: (atMs: number) => Promise<SiteModel>,
    reason: (v: TrapVerdict) => string,
  ): Promise<{ reassessed: number; cleared: number }> {
    const open = this.engine.openAlarms().filter((a) => a.kind === 'trap' && a.siteId === siteId && a.unitId !== null);
    const settings = this.settings.forSite(siteId);
    let cleared = 0;
    let reassessed = 0;
    for (const a of open) {
      const r = latestTrapReadings(a);
      if (!r) continue;
      const v = trapUnderModel(r, await modelAt(Date.parse(r.ts)), settings);
      reassessed++;
      if (v.holds || a.state !== 'active') continue;
      this.engine.book.clear({ unitId: a.unitId, serial: a.serial, siteId: a.siteId }, 'trap', this.opts.now(), reason(v));
      cleared++;
    }
    await this.store.flush();
    return { reassessed, cleared };
  }

  /** Settled alarm writes (tests wait for them). */
  flush(): Promise<void> {
    return this.store.flush();
  }

  private refOf(u: UnitInfo): UnitRef {
    const r = this.refs.get(u.id);
    if (r && r.serial === u.serial && r.siteId === u.siteId && r.detectorTiltDeg === u.detectorTiltDeg && r.onHold === u.onHold) return r;
    const fresh = unitRefOf(u);
    this.refs.set(u.id, fresh);
    return fresh;
  }

  private guard(f: () => void): void {
    try {
      f();
    } catch (err) {
      this.log.error({ err }, 'health engine failed on a message');
    }
  }
}
