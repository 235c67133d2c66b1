/**
 * Fleet health on the server: feeds the health engine (server/health) from the ingest listeners, gives it the landscape
 * engine's model of each site (cached per site for a few minutes, computed in the background), persists alarms, pushes
 * them to dashboards, and answers the alarm, scan and on-demand routes. Weather comes from the stored station readings
 * (polled), so the stow watch needs no extra ingest hook.
 *
 * Tickets: `onAlarmRaised(listener)` is the hook for the tickets service (open a ticket for alarms at or above a
 * severity); nothing subscribes to it yet.
 */
import type { Logger } from 'pino';
import type { Telemetry, UnitEvent, UnitStatus, Weather } from '../../shared/contracts/wire';
import { analyseLandscape, bestReachableOrientation, detectorReadings, type Sky } from '../../shared/landscape';
import type { AlarmRepository, AlarmListRow, HealthReadRepository } from '../data/alarm-repository';
import { badRequest, notFound } from '../errors/app-error';
import type { Alarm } from '../health/alarm-types';
import { HealthEngine } from '../health/health-engine';
import { healthSettingsOverrideSchema, resolveHealthSettings, sanitizeStoredOverrides, DEFAULT_HEALTH_SETTINGS, HEALTH_SETTING_RANGES, type HealthSettings, type HealthSettingsOverride } from '../health/health-settings';
import { compareScan, type ScanComparison, type ScanSample } from '../health/scan-rebuild';
import type { SiteModel, SiteModelProvider } from '../health/site-model';
import type { UnitRef } from '../health/unit-sample';
import { validationError } from '../errors/validation-error';
import type { AdminService } from './admin-service';
import { scopeOf, type Caller } from './caller';
import type { LiveHub } from './live-hub';
import type { SiteModelService } from './site-model-service';
import type { UnitDirectory, UnitInfo } from './unit-directory';

export type { AlarmView } from '../../shared/contracts/alarms';
import type { AlarmView } from '../../shared/contracts/alarms';

export interface HealthServiceOptions {
  now: () => number;
  /** Comms and weather check interval [ms]. */
  tickMs: number;
  /** A site model is recomputed when older than this [ms]. */
  modelRefreshMs: number;
  /** …and not used when older than this [ms]. */
  modelMaxAgeMs: number;
  /** Highest tilt units can reach [°] (the modelled global maximum is searched below it). */
  maxTiltDeg: number;
  /** After a restart, how long units last heard before it get to reconnect before the comms watch judges them [ms]. */
  restoreGraceMs: number;
}

export const DEFAULT_HEALTH_SERVICE_OPTIONS: HealthServiceOptions = { now: Date.now, tickMs: 5000, modelRefreshMs: 5 * 60_000, modelMaxAgeMs: 15 * 60_000, maxTiltDeg: 85, restoreGraceMs: 60_000 };

/** Longest on-demand run [h] and most reports it reads. */
const RUN_MAX_HOURS = 48;
const RUN_MAX_ROWS = 400_000;

export class HealthService {
  readonly engine: HealthEngine;
  private readonly opts: HealthServiceOptions;
  private readonly models = new Map<number, { model: SiteModel; builtMs: number }>();
  private readonly building = new Map<number, Promise<void>>();
  private readonly settings = new Map<number, HealthSettings>();
  private readonly dbIds = new Map<string, Promise<number | null>>();
  private readonly raisedListeners = new Set<(a: AlarmView) => void>();
  private readonly writes = new Set<Promise<unknown>>();
  private timer: NodeJS.Timeout | undefined;
  private weatherAfterMs: number;
  private polling = false;

  constructor(
    private readonly repo: AlarmRepository,
    private readonly reads: HealthReadRepository,
    private readonly units: UnitDirectory,
    private readonly siteModel: SiteModelService,
    private readonly admin: AdminService,
    private readonly live: LiveHub,
    private readonly log: Logger,
    opts: Partial<HealthServiceOptions> = {},
  ) {
    this.opts = { ...DEFAULT_HEALTH_SERVICE_OPTIONS, ...opts };
    this.weatherAfterMs = this.opts.now() - 60_000;
    this.engine = new HealthEngine({
      now: this.opts.now,
      models: this.provider(),
      settingsFor: (siteId) => this.settings.get(siteId) ?? DEFAULT_HEALTH_SETTINGS,
      listeners: {
        raised: (a) => this.persistRaised(a),
        updated: (a) => this.persistUpdated(a),
        cleared: (a) => this.persistCleared(a),
        stow: (e) => this.live.publishAlarm(e.unitId, { kind: 'wind-stow', severity: 'P4', state: 'event', serial: e.serial, siteId: e.siteId, at: new Date(e.atMs).toISOString(), event: e.kind, message: e.message }),
      },
    });
  }

  async start(): Promise<void> {
    for (const [siteId, o] of await this.repo.allSettings()) this.settings.set(siteId, resolveHealthSettings(this.stored(siteId, o)));
    this.timer = setInterval(() => this.tick(), this.opts.tickMs);
    this.timer.unref();
  }

  /** Units' last stored messages at start-up ([unit, arrival ms, unit timestamp ms]): the comms watch covers them at once. */
  restore(last: [UnitInfo, number, number][]): void {
    const graceUntil = this.opts.now() + this.opts.restoreGraceMs;
    for (const [unit, arrivalMs, tsMs] of last) this.engine.restore(refOf(unit), arrivalMs, tsMs, graceUntil);
  }

  async stop(): Promise<void> {
    clearInterval(this.timer);
    await Promise.allSettled([...this.writes]);
  }

  /** The hook for tickets: called once per raised alarm (after it is stored). Returns an unsubscribe function. */
  onAlarmRaised(listener: (a: AlarmView) => void): () => void {
    this.raisedListeners.add(listener);
    return () => this.raisedListeners.delete(listener);
  }

  // ---- ingest listeners
  telemetry(unit: UnitInfo, t: Telemetry): void {
    this.guard(() => this.engine.telemetry(refOf(unit), t));
  }

  event(unit: UnitInfo, e: UnitEvent): void {
    this.guard(() => this.engine.event(refOf(unit), e));
  }

  status(unit: UnitInfo, st: UnitStatus): void {
    this.guard(() => this.engine.status(refOf(unit), st));
  }

  /** One pass of the periodic work (also called by tests). */
  tick(): void {
    this.guard(() => this.engine.tick());
    this.engine.book.pruneCleared();
    void this.pollWeather();
  }

  // ---- routes
  async list(c: Caller, f: { siteId?: number; unitId?: number; state?: 'active' | 'cleared'; limit?: number }): Promise<AlarmView[]> {
    if (f.siteId !== undefined) await this.admin.getSite(c, f.siteId);
    if (f.unitId !== undefined) await this.admin.getUnit(c, f.unitId);
    return (await this.repo.list(scopeOf(c), f)).map(toView);
  }

  async get(c: Caller, id: number): Promise<AlarmView> {
    const r = await this.repo.get(id, scopeOf(c));
    if (!r) throw notFound('Alarm');
    return toView(r);
  }

  async acknowledge(c: Caller, id: number): Promise<AlarmView> {
    const a = await this.get(c, id);
    await this.repo.acknowledge(id, c.id, new Date(this.opts.now()), {
      action: 'alarm-acknowledge', target: `alarm:${id}`, detail: { unitId: a.unitId, serial: a.serial, siteId: a.siteId, kind: a.kind, severity: a.severity },
    });
    const v = await this.get(c, id);
    if (v.unitId !== null) this.live.publishAlarm(v.unitId, v);
    return v;
  }

  async siteSettings(c: Caller, siteId: number): Promise<{ defaults: HealthSettings; overrides: Partial<HealthSettings>; effective: HealthSettings; ranges: typeof HEALTH_SETTING_RANGES }> {
    await this.admin.getSite(c, siteId);
    const overrides = this.stored(siteId, await this.repo.settings(siteId));
    return { defaults: { ...DEFAULT_HEALTH_SETTINGS }, overrides, effective: resolveHealthSettings(overrides), ranges: HEALTH_SETTING_RANGES };
  }

  async saveSiteSettings(c: Caller, siteId: number, body: unknown) {
    await this.admin.getSite(c, siteId);
    const r = healthSettingsOverrideSchema.safeParse(body ?? {});
    if (!r.success) throw validationError(r.error, 'The health settings');
    const overrides = Object.fromEntries(Object.entries(r.data).filter(([, v]) => v !== undefined)) as Record<string, number>;
    await this.repo.saveSettings(siteId, overrides, c.id, new Date(this.opts.now()), (before) => ({
      action: 'health-settings-update', target: `site:${siteId}`, detail: { before: before ?? {}, after: overrides },
    }));
    this.settings.set(siteId, resolveHealthSettings(overrides));
    return this.siteSettings(c, siteId);
  }

  /** Stored overrides within their ranges; anything else (written before the ranges existed) falls back to its default. */
  private stored(siteId: number, overrides: Record<string, unknown> | null): HealthSettingsOverride {
    return sanitizeStoredOverrides(overrides, (key, value) => this.log.warn({ siteId, key, value }, 'stored health setting out of range: its default applies'));
  }

  /** The unit's latest (or a given) scan rebuilt and compared with the model. */
  async scanResult(c: Caller, unitId: number, commandId?: string): Promise<ScanComparison & { commandId: string; startedAt: string; completedAt: string | null; complete: boolean }> {
    const unit = await this.admin.getUnit(c, unitId);
    const events = await this.repo.scanEvents(unit.id, commandId);
    const samples: ScanSample[] = [];
    let done: Date | null = null;
    let id = commandId ?? '';
    for (const e of events) {
      const body = (typeof e.body === 'string' ? JSON.parse(e.body) : e.body) as UnitEvent;
      id ||= body.commandId ?? '';
      if (e.kind === 'scan-samples') samples.push(...(body.samples ?? []));
      if (e.kind === 'scan-complete') done = new Date(e.ts);
    }
    if (!samples.length) throw notFound('Scan');
    const started = new Date(events[0]!.ts);
    const before = await this.reads.poaBefore(unit.id, started);
    const info = this.units.byUnitId(unit.id);
    let model: { globalMax: { tiltDeg: number; azimuthDeg: number; wm2: number } } | null = null;
    if (info) {
      const sky = await this.siteModel.skyAt(info.siteId, (done ?? started).getTime()).catch(() => null);
      if (sky) model = { globalMax: this.globalMaxOf(sky.sky) };
    }
    return { commandId: id, startedAt: started.toISOString(), completedAt: done ? (done as Date).toISOString() : null, complete: done !== null, ...compareScan(samples, before, model) };
  }

  /**
   * Runs the detectors over stored telemetry of a range (not persisted): the alarms they would have raised. Models come
   * from the site survey with the stored weather, one per 10 minutes.
   */
  async runRange(c: Caller, req: { from: string; to: string; unitIds?: number[] }): Promise<{ from: string; to: string; units: number; reports: number; alarms: AlarmView[] }> {
    const from = Date.parse(req.from);
    const to = Date.parse(req.to);
    if (!(from < to)) throw badRequest('The range is empty.', { to: 'Must be after from.' });
    if (to - from > RUN_MAX_HOURS * 3_600_000) throw badRequest(`The range is longer than ${RUN_MAX_HOURS} h.`, { to: `At most ${RUN_MAX_HOURS} h after from.` });
    const visible = new Set((await this.admin.listUnits(c)).map((u) => u.id));
    const ids = (req.unitIds ?? [...visible]).filter((id) => visible.has(id));
    if (req.unitIds && ids.length !== req.unitIds.length) throw notFound('Unit');
    const infos = ids.map((id) => this.units.byUnitId(id)).filter((u): u is UnitInfo => !!u);
    const rows = infos.length ? await this.reads.telemetryRange(infos.map((u) => u.id), new Date(from), new Date(to), RUN_MAX_ROWS) : [];
    const slotMs = 10 * 60_000;
    const cache = new Map<string, SiteModel | undefined>();
    for (const siteId of new Set(infos.map((u) => u.siteId))) {
      for (let s = Math.floor(from / slotMs) * slotMs; s < to; s += slotMs) cache.set(`${siteId}@${s}`, await this.buildModel(siteId, s + slotMs / 2).catch(() => undefined));
    }
    let clock = from;
    const engine = new HealthEngine({
      now: () => clock,
      models: { siteModel: (siteId, atMs) => cache.get(`${siteId}@${Math.floor(atMs / slotMs) * slotMs}`) },
      settingsFor: (siteId) => this.settings.get(siteId) ?? DEFAULT_HEALTH_SETTINGS,
    });
    const byId = new Map(infos.map((u) => [u.id, refOf(u)]));
    let lastTick = from;
    for (const r of rows) {
      const t = telemetryOf(r);
      clock = Date.parse(t.ts);
      if (clock - lastTick >= 5000) {
        engine.tick();
        lastTick = clock;
      }
      engine.telemetry(byId.get(Number(r['unit_id']))!, t);
    }
    clock = to;
    engine.tick();
    const alarms = engine.book.all().map((a, i) => alarmView(-(i + 1), a));
    return { from: new Date(from).toISOString(), to: new Date(to).toISOString(), units: infos.length, reports: rows.length, alarms };
  }

  // ---- site models
  private provider(): SiteModelProvider {
    return {
      siteModel: (siteId, atMs) => {
        const hit = this.models.get(siteId);
        const now = this.opts.now();
        if (!hit || now - hit.builtMs > this.opts.modelRefreshMs) this.refreshModel(siteId);
        if (!hit || Math.abs(hit.model.atMs - atMs) > this.opts.modelMaxAgeMs) return undefined;
        return hit.model;
      },
    };
  }

  private refreshModel(siteId: number): void {
    if (this.building.has(siteId)) return;
    const now = this.opts.now();
    const p = this.buildModel(siteId, now)
      .then((model) => void this.models.set(siteId, { model, builtMs: now }))
      .catch((err) => this.log.warn({ err, siteId }, 'site model for health failed'))
      .finally(() => this.building.delete(siteId));
    this.building.set(siteId, p);
  }

  private async buildModel(siteId: number, atMs: number): Promise<SiteModel> {
    const resolved = await this.siteModel.skyAt(siteId, atMs);
    const indoor = await this.reads.siteIndoor(siteId);
    const sky = resolved.sky;
    const maxTilt = this.opts.maxTiltDeg;
    let analysis: ReturnType<NonNullable<SiteModel['analyse']>> | undefined;
    return {
      atMs,
      sunElevationDeg: resolved.input.sun?.elevationDeg ?? -90,
      indoor,
      globalMax: this.globalMaxOf(sky),
      readings: (tiltDeg, azimuthDeg, detectorTiltDeg) => detectorReadings(sky, tiltDeg, azimuthDeg, Math.min(45, Math.max(0, detectorTiltDeg))),
      analyse: () => {
        if (!analysis) {
          const r = analyseLandscape(sky, { stepDeg: 2, tiltRangeDeg: [0, maxTilt] });
          analysis = { localMaxima: r.localMaxima, minSinglePeakDetectorTiltDeg: r.minSinglePeakDetectorTiltDeg };
        }
        return analysis;
      },
    };
  }

  private globalMaxOf(sky: Sky) {
    return bestReachableOrientation(sky, { tiltRangeDeg: [0, this.opts.maxTiltDeg], azimuthRangeDeg: [0, 360] });
  }

  // ---- weather
  private async pollWeather(): Promise<void> {
    if (this.polling) return;
    this.polling = true;
    try {
      const rows = await this.reads.weatherSince(this.weatherAfterMs);
      for (const r of rows) {
        const ts = new Date(r.ts);
        this.weatherAfterMs = Math.max(this.weatherAfterMs, ts.getTime());
        const w: Weather = { v: 1, ts: ts.toISOString(), ghiWm2: r.ghi_wm2, ...(r.dhi_wm2 !== null ? { dhiWm2: r.dhi_wm2 } : {}), airTempC: r.air_temp_c, windMs: r.wind_ms, gustMs: r.gust_ms };
        this.guard(() => this.engine.weather(r.site_id, w));
      }
    } catch (err) {
      this.log.warn({ err }, 'health weather poll failed');
    } finally {
      this.polling = false;
    }
  }

  // ---- persistence (writes of one alarm are chained, so an update never overtakes its insert)
  private persistRaised(a: Alarm): void {
    const p = (async () => {
      const existing = await this.repo.findActive(a.siteId, a.unitId, a.kind);
      const row = rowOf(a);
      if (existing) {
        await this.repo.update(existing.id, { ...row, first_seen_at: existing.first_seen_at, raised_at: existing.raised_at });
        return existing.id;
      }
      return this.repo.insert(row);
    })().catch((err) => {
      this.log.error({ err, kind: a.kind }, 'storing an alarm failed');
      return null;
    });
    this.dbIds.set(a.key, p);
    this.track(p.then((id) => {
      if (id === null) return;
      const v = alarmView(id, a);
      this.publish(a, v);
      for (const l of this.raisedListeners) {
        try {
          l(v);
        } catch (err) {
          this.log.error({ err }, 'alarm-raised listener failed');
        }
      }
    }));
  }

  private persistUpdated(a: Alarm): void {
    const snapshot = rowOf(a);
    this.chain(a, (id) => this.repo.update(id, { severity: snapshot.severity, message: snapshot.message, advice: snapshot.advice, evidence: snapshot.evidence, last_seen_at: snapshot.last_seen_at }));
  }

  private persistCleared(a: Alarm): void {
    const snapshot = rowOf(a);
    this.chain(a, async (id) => {
      await this.repo.update(id, { state: 'cleared', cleared_at: snapshot.cleared_at, clear_reason: snapshot.clear_reason, last_seen_at: snapshot.last_seen_at });
      this.publish(a, alarmView(id, a));
    });
    this.dbIds.delete(a.key);
  }

  private chain(a: Alarm, write: (id: number) => Promise<void>): void {
    const prev = this.dbIds.get(a.key);
    if (!prev) return;
    const next = prev.then(async (id) => {
      if (id === null) return null;
      await write(id).catch((err) => this.log.error({ err, kind: a.kind }, 'updating an alarm failed'));
      return id;
    });
    if (a.state === 'active') this.dbIds.set(a.key, next);
    this.track(next);
  }

  private publish(a: Alarm, v: AlarmView): void {
    const unitId = a.unitId ?? this.units.all().find((u) => u.siteId === a.siteId)?.id;
    if (unitId !== undefined) this.live.publishAlarm(unitId, v);
  }

  private track(p: Promise<unknown>): void {
    this.writes.add(p);
    void p.finally(() => this.writes.delete(p));
  }

  /** Settled writes (tests wait for them). */
  async flush(): Promise<void> {
    while (this.writes.size) await Promise.allSettled([...this.writes]);
  }

  private guard(f: () => void): void {
    try {
      f();
    } catch (err) {
      this.log.error({ err }, 'health engine failed on a message');
    }
  }
}

const refOf = (u: UnitInfo): UnitRef => ({ unitId: u.id, serial: u.serial, siteId: u.siteId, detectorTiltDeg: u.detectorTiltDeg, onHold: u.onHold });
const iso = (ms: number) => new Date(ms).toISOString();

function rowOf(a: Alarm) {
  return {
    unit_id: a.unitId, site_id: a.siteId, kind: a.kind, severity: a.severity, state: a.state,
    message: a.message.slice(0, 600), advice: a.advice.slice(0, 600), evidence: JSON.stringify(a.evidence),
    first_seen_at: new Date(a.firstSeenMs), raised_at: new Date(a.raisedMs), last_seen_at: new Date(a.lastSeenMs),
    cleared_at: a.clearedMs === null ? null : new Date(a.clearedMs), clear_reason: a.clearReason,
    acknowledged_at: null, acknowledged_by: null,
  };
}

function alarmView(id: number, a: Alarm): AlarmView {
  return {
    id, kind: a.kind, severity: a.severity, state: a.state, unitId: a.unitId, serial: a.serial, siteId: a.siteId,
    message: a.message, advice: a.advice, evidence: a.evidence,
    firstSeenAt: iso(a.firstSeenMs), raisedAt: iso(a.raisedMs), lastSeenAt: iso(a.lastSeenMs),
    clearedAt: a.clearedMs === null ? null : iso(a.clearedMs), clearReason: a.clearReason, acknowledgedAt: null, acknowledgedBy: null,
  };
}

function toView(r: AlarmListRow): AlarmView {
  const d = (x: Date | null) => (x === null ? null : new Date(x).toISOString());
  return {
    id: r.id, kind: r.kind, severity: r.severity, state: r.state, unitId: r.unit_id, serial: r.serial, siteId: r.site_id, siteName: r.site_name,
    message: r.message, advice: r.advice, evidence: typeof r.evidence === 'string' ? JSON.parse(r.evidence) : r.evidence,
    firstSeenAt: d(r.first_seen_at)!, raisedAt: d(r.raised_at)!, lastSeenAt: d(r.last_seen_at)!, clearedAt: d(r.cleared_at), clearReason: r.clear_reason,
    acknowledgedAt: d(r.acknowledged_at), acknowledgedBy: r.acknowledged_by_name,
  };
}

/** A stored telemetry row back in wire form. */
function telemetryOf(r: Record<string, unknown>): Telemetry {
  const n = (k: string) => Number(r[k]);
  return {
    v: 1, seq: n('seq'), ts: new Date(r['ts'] as Date).toISOString(),
    tiltPlusWm2: n('tilt_plus_wm2'), tiltMinusWm2: n('tilt_minus_wm2'), azimuthPlusWm2: n('azimuth_plus_wm2'), azimuthMinusWm2: n('azimuth_minus_wm2'),
    poaWm2: n('poa_wm2'), tiltDeg: n('tilt_deg'), azimuthDeg: n('azimuth_deg'), cmdTiltDeg: n('cmd_tilt_deg'), cmdAzimuthDeg: n('cmd_azimuth_deg'),
    tiltMotorA: n('tilt_motor_a'), azimuthMotorA: n('azimuth_motor_a'), dcPowerW: n('dc_power_w'), moduleTempC: n('module_temp_c'),
    mode: r['mode'] as Telemetry['mode'], firmware: '',
  };
}
