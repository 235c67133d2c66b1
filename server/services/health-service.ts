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
import type { AlarmStore } from './alarm-store';
import type { HealthSettingsService } from './health-settings-service';
import type { LiveHub } from './live-hub';
import type { SiteModelCache, SiteModelCacheOptions } from './site-model-cache';
import { unitRefOf, type UnitInfo } from './unit-directory';
import type { UnitRef } from '../health/unit-sample';

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
  /** The engine's reference of each unit, made again only when what it holds changed (the engine keys state on it). */
  private readonly refs = new Map<number, UnitRef>();

  constructor(
    private readonly store: AlarmStore,
    models: SiteModelCache,
    private readonly settings: HealthSettingsService,
    live: LiveHub,
    private readonly log: Logger,
    opts: Partial<HealthServiceOptions> = {},
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
    this.timer = setInterval(() => this.tick(), this.opts.tickMs);
    this.timer.unref();
  }

  /** Units' last stored messages at start-up ([unit, arrival ms, unit timestamp ms]): the comms watch covers them at once. */
  restore(last: [UnitInfo, number, number][]): void {
    const graceUntil = this.opts.now() + this.opts.restoreGraceMs;
    for (const [unit, arrivalMs, tsMs] of last) this.engine.restore(unitRefOf(unit), arrivalMs, tsMs, graceUntil);
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
    this.guard(() => this.engine.telemetry(this.refOf(unit), t));
  }

  event(unit: UnitInfo, e: UnitEvent): void {
    this.guard(() => this.engine.event(this.refOf(unit), e));
  }

  status(unit: UnitInfo, st: UnitStatus): void {
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
