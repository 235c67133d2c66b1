/**
 * The health engine: feeds each unit's telemetry, events and status through the detectors and keeps the alarm book.
 * Pure and synchronous: the clock (arrival time, for comms) and the site models are injected, so the server feeds it
 * from the ingest with the landscape engine behind the models, and the offline evaluation feeds it from the simulator
 * with the simulator's own sky. Per-unit detectors run on the units' own timestamps; comms runs on the clock at `tick()`.
 *
 * Alarm hygiene (see alarm-book.ts for the lifecycle): daylight gating for production checks; a dark site raises one site
 * alarm and suppresses its units' alarms; a trap is not raised while stall, drift or hunting explains the deficit.
 */
import type { Telemetry, UnitEvent, UnitStatus, Weather } from '../../shared/contracts/wire';
import { AlarmBook, type AlarmBookListeners, type AlarmTiming } from './alarm-book';
import type { AlarmKind } from '../../shared/contracts/alarms';
import type { Alarm, AlarmSubject, StowEvent } from './alarm-types';
import { CommsDetector, type CommsView } from './comms-detector';
import { DriftDetector } from './drift-detector';
import { DEFAULT_HEALTH_SETTINGS, MIN_MS, type HealthSettings } from './health-settings';
import { HuntingDetector } from './hunting-detector';
import type { SiteModel, SiteModelProvider } from './site-model';
import { SoilingDetector } from './soiling-detector';
import { StallDetector } from './stall-detector';
import { StowWatch } from './stow-watch';
import { PeerLevels, TrapDetector, type PeerReading, type TrapContext } from './trap-detector';
import { NO_DETAIL, round1, type Assessment, type UnitRef } from './unit-sample';

export interface HealthEngineOptions {
  /** Arrival clock [ms] (the server's wall clock, or the simulator's time offline). */
  now: () => number;
  models: SiteModelProvider;
  /** Settings of a site (defaults with its overrides). */
  settingsFor?: (siteId: number) => HealthSettings;
  listeners?: AlarmBookListeners & { stow?: (e: StowEvent) => void };
}

const CAUSES: AlarmKind[] = ['stall', 'drift', 'hunting'];
/** How long a site's peer snapshot serves the reports that follow it [ms]. */
const SITE_SNAPSHOT_MS = 2000;

export class HealthEngine {
  readonly book: AlarmBook;
  private readonly trap = new TrapDetector();
  private readonly stall = new StallDetector();
  private readonly drift = new DriftDetector();
  private readonly hunting = new HuntingDetector();
  private readonly soiling = new SoilingDetector();
  private readonly comms = new CommsDetector();
  private readonly stow = new StowWatch();
  private readonly units = new Map<number, UnitRef>();
  private readonly peers = new Map<number, Map<number, PeerReading>>();
  private readonly siteSnapshots = new Map<number, SiteSnapshot>();
  private readonly darkSites = new Set<number>();
  /** Units restored from the store at start-up, not judged before this time unless heard first [ms]. */
  private readonly restoredGraceUntil = new Map<number, number>();
  private readonly settingsFor: (siteId: number) => HealthSettings;
  private readonly subjects = new Map<number, { ref: UnitRef; subject: AlarmSubject }>();

  constructor(private readonly opts: HealthEngineOptions) {
    this.book = new AlarmBook(opts.listeners);
    this.settingsFor = opts.settingsFor ?? (() => DEFAULT_HEALTH_SETTINGS);
  }

  /** Whether production checks run at a site now (modelled best orientation bright enough; sun up outdoors). */
  /** Lazily computed, briefly cached peer readings and trapped-unit count of a site. */
  private siteSnapshot(siteId: number, atMs: number, sitePeers: Map<number, PeerReading>): SiteSnapshot {
    let snap = this.siteSnapshots.get(siteId);
    if (!snap || Math.abs(atMs - snap.atMs) > SITE_SNAPSHOT_MS)
      this.siteSnapshots.set(siteId, (snap = new SiteSnapshot(atMs, sitePeers, this)));
    else snap.sitePeers = sitePeers;
    return snap;
  }

  /** Whether a unit's trap condition holds now (for a site's count of trapped units). */
  trapHolding(unitId: number): boolean {
    return this.book.holding(this.subjectOf(this.units.get(unitId)!), 'trap');
  }

  static daylight(m: SiteModel | undefined, s: HealthSettings): boolean {
    if (!m) return false;
    return m.globalMax.wm2 >= s.daylightMinWm2 && (m.indoor || m.sunElevationDeg >= s.daylightMinSunElevationDeg);
  }

  telemetry(unit: UnitRef, t: Telemetry): void {
    this.units.set(unit.unitId, unit);
    const atMs = Date.parse(t.ts);
    const s = this.settingsFor(unit.siteId);
    this.heard(unit, atMs, true, s);
    const model = this.opts.models.siteModel(unit.siteId, atMs);
    const daylight = HealthEngine.daylight(model, s);
    let sitePeers = this.peers.get(unit.siteId);
    if (!sitePeers) this.peers.set(unit.siteId, (sitePeers = new Map()));
    sitePeers.set(unit.unitId, { unitId: unit.unitId, poaWm2: t.poaWm2, mode: t.mode, atMs });
    const subject = this.subjectOf(unit);
    const suppressed = this.darkSites.has(unit.siteId);
    const tm = timingsOf(s);

    this.put(subject, 'stall', this.stall.assess(unit, t, atMs, s, this.stow.demanding(unit.siteId)), atMs, tm.stall, suppressed);
    this.put(
      subject,
      'drift',
      this.drift.assess(unit, t, atMs, model, daylight, this.isOpen(subject, 'drift'), s),
      atMs,
      tm.drift,
      suppressed,
    );
    // A drifting or dead detector makes the controller chase a false differential: that shows as back-and-forth motion,
    // but the cause is the sensor, so hunting is not raised on top while a drift condition holds or its alarm is open
    // (consequential alarms are suppressed under their cause: common practice).
    const sensorFault = this.book.holding(subject, 'drift') || this.isOpen(subject, 'drift');
    const huntingNow = this.hunting.assess(unit, t, atMs, daylight, this.isOpen(subject, 'hunting'), s);
    this.put(subject, 'hunting', huntingNow, atMs, tm.hunting, suppressed || sensorFault);
    // Parent/child suppression: a stall, drift or hunting condition that holds, or a stall or drift alarm still open (a
    // drive or sensor fault changes where the unit can balance until it is repaired), explains a deficit; the unit gets
    // no trap alarm on top. A hunting unit that has come to rest on a local maximum is trapped like any other.
    let otherCause: AlarmKind | null = null;
    for (const k of CAUSES)
      if (this.book.holding(subject, k) || (k !== 'hunting' && this.isOpen(subject, k))) {
        otherCause = k;
        break;
      }
    // Site-wide figures cost one pass over the site's units: computed only when the trap detector asks, and shared by the
    // reports of the site within the same couple of seconds (a large site would otherwise make each report O(units)).
    const site = this.siteSnapshot(unit.siteId, atMs, sitePeers);
    this.put(
      subject,
      'trap',
      this.trap.assess(unit, t, atMs, new TrapView(model, daylight, site, otherCause, this.isOpen(subject, 'trap')), s),
      atMs,
      tm.trap,
      suppressed,
    );
    this.put(
      subject,
      'soiling',
      this.soiling.assess(unit, t, atMs, daylight, this.isOpen(subject, 'soiling'), s),
      atMs,
      tm.soiling,
      suppressed,
    );
    this.put(subject, 'not-stowed', this.stow.assess(unit, t, atMs, s), atMs, tm.notStowed, suppressed);
  }

  private isOpen(subject: AlarmSubject, kind: AlarmKind): boolean {
    return this.book.openAlarm(subject, kind) !== null;
  }

  private put(subject: AlarmSubject, kind: AlarmKind, a: Assessment, atMs: number, t: AlarmTiming, suppressed: boolean): void {
    this.book.assess(subject, kind, a.condition, atMs, t, a.detail, suppressed);
  }

  event(unit: UnitRef, e: UnitEvent): void {
    this.units.set(unit.unitId, unit);
    const atMs = Date.parse(e.ts);
    this.heard(unit, atMs, false, this.settingsFor(unit.siteId));
    this.stall.event(unit, e);
    if (e.kind === 'mode-change' && (e.code === 'wind-stow' || e.code === 'wind-stow-released')) {
      this.opts.listeners?.stow?.({
        unitId: unit.unitId,
        serial: unit.serial,
        siteId: unit.siteId,
        atMs,
        kind: e.code === 'wind-stow' ? 'stowed' : 'released',
        message: e.message ?? '',
      });
    }
  }

  status(unit: UnitRef, st: UnitStatus): void {
    this.units.set(unit.unitId, unit);
    const now = this.opts.now();
    if (st.online) this.heard(unit, st.ts ? Date.parse(st.ts) : now, false, this.settingsFor(unit.siteId));
    else this.comms.offline(unit.unitId, now);
  }

  /** A site weather-station reading (it also counts as a message from the unit that carries the station, if given). */
  weather(siteId: number, w: Weather, from?: UnitRef): void {
    const atMs = Date.parse(w.ts);
    const s = this.settingsFor(siteId);
    if (from) {
      this.units.set(from.unitId, from);
      this.heard(from, atMs, false, s);
    }
    this.stow.weather(siteId, w, atMs, s);
  }

  /**
   * A unit last heard before a restart: the comms watch covers it from the start, so a site that went dark while the
   * server was down still raises its alarm. Units get until `graceUntilMs` to reconnect before they are judged; one
   * still silent then is judged from its stored last message.
   */
  restore(unit: UnitRef, lastArrivalMs: number, lastTsMs: number, graceUntilMs: number): void {
    if (this.units.has(unit.unitId)) return;
    this.units.set(unit.unitId, unit);
    this.comms.restore(unit.unitId, lastArrivalMs, lastTsMs);
    this.restoredGraceUntil.set(unit.unitId, graceUntilMs);
  }

  /**
   * What another server heard of a unit (the shared last-heard store): for the comms watch it counts as a message that
   * arrived at `arrivalMs`, or as a last will at `offlineMs`. Nothing happens when it is not newer than what is known.
   */
  heardElsewhere(unit: UnitRef, arrivalMs: number, tsMs: number, offlineMs: number | null): void {
    this.units.set(unit.unitId, unit);
    const known = this.comms.lastArrival(unit.unitId);
    if (known === undefined || arrivalMs > known) this.heard(unit, tsMs, false, this.settingsFor(unit.siteId), arrivalMs);
    if (offlineMs !== null && offlineMs >= arrivalMs) this.comms.offline(unit.unitId, offlineMs);
  }

  /** Periodic check on the clock (every few seconds): comms loss per unit, dark sites. */
  tick(): void {
    const now = this.opts.now();
    const bySite = new Map<number, (CommsView & { unit: UnitRef })[]>();
    for (const id of this.comms.known()) {
      const unit = this.units.get(id);
      if (!unit) continue;
      const grace = this.restoredGraceUntil.get(id);
      if (grace !== undefined) {
        if (now < grace) continue;
        this.restoredGraceUntil.delete(id);
      }
      const v = this.comms.view(id, now, this.settingsFor(unit.siteId))!;
      let list = bySite.get(unit.siteId);
      if (!list) bySite.set(unit.siteId, (list = []));
      list.push({ unit, ...v });
    }
    for (const [siteId, list] of bySite) {
      const s = this.settingsFor(siteId);
      const day = HealthEngine.daylight(this.opts.models.siteModel(siteId, now), s);
      const silent = list.filter((x) => x.silent);
      const dark = list.length >= 2 && silent.length >= 2 && silent.length >= s.siteDarkFraction * list.length;
      const site: AlarmSubject = { unitId: null, serial: null, siteId };
      const commsTiming = timing(day ? s.commsDelayOnMin : s.commsNightDelayOnMin, s.commsClearDelayMin);
      // The site went dark when enough of its units had fallen silent (it may have been before this tick, even before a
      // restart): let the delay-on run from then, as for a single unit.
      if (dark && !this.book.holding(site, 'site-comms')) {
        const since = silent.map((x) => x.silentSinceMs).sort((a, b) => a - b);
        const darkSinceMs = since[Math.max(1, Math.ceil(s.siteDarkFraction * list.length) - 1)] ?? now;
        this.book.assess(
          site,
          'site-comms',
          true,
          Math.min(now, darkSinceMs),
          commsTiming,
          () => ({ severity: 'P4', message: '', advice: '', evidence: {} }),
          true,
        );
      }
      const siteAlarm = this.book.assess(site, 'site-comms', dark, now, commsTiming, () => ({
        severity: day ? 'P2' : 'P3',
        message: `${silent.length} of ${list.length} units silent${day ? '' : ' (night)'}: the site's gateway, backhaul or power is down.`,
        advice:
          'Check the site gateway, its backhaul and power first; check whether the units still produce (meter or inverter). After reconnection confirm the buffered data came in.',
        evidence: {
          silentUnits: silent.map((x) => ({
            serial: x.unit.serial,
            silentMin: round1(x.silentForMs / MIN_MS),
            byLastWill: x.offlineByWill,
          })),
          units: list.length,
          night: !day,
        },
      }));
      if (dark) this.darkSites.add(siteId);
      else this.darkSites.delete(siteId);
      for (const x of list) {
        const subject = this.subjectOf(x.unit);
        if (siteAlarm) {
          this.book.clear(subject, 'comms', now, 'superseded by site alarm');
          continue;
        }
        // The silence started before this tick: let the delay-on run from its start.
        if (x.silent && !this.book.holding(subject, 'comms'))
          this.book.assess(
            subject,
            'comms',
            true,
            Math.min(now, x.silentSinceMs),
            commsTiming,
            () => ({ severity: 'P4', message: '', advice: '', evidence: {} }),
            true,
          );
        this.book.assess(
          subject,
          'comms',
          x.silent,
          now,
          commsTiming,
          () => ({
            severity: day ? 'P3' : 'P4',
            message: `No message for ${round1(x.silentForMs / MIN_MS)} min${x.offlineByWill ? ' (the unit went offline without a clean disconnect)' : ''}; expected one every ${round1(x.intervalMs / 1000)} s.`,
            advice:
              "Check the unit controller's power and modem; check whether it still produces. It stores and forwards its reports, so confirm the gap fills after reconnection.",
            evidence: {
              lastMessageAt: new Date(x.lastArrivalMs).toISOString(),
              silentMin: round1(x.silentForMs / MIN_MS),
              byLastWill: x.offlineByWill,
              intervalS: round1(x.intervalMs / 1000),
              night: !day,
            },
          }),
          dark,
        );
      }
    }
  }

  /** Forgets a unit (deleted, or moved to another site). */
  forget(unitId: number): void {
    const u = this.units.get(unitId);
    for (const d of [this.trap, this.stall, this.drift, this.hunting, this.soiling, this.comms]) d.forget(unitId);
    if (u) this.peers.get(u.siteId)?.delete(unitId);
    this.units.delete(unitId);
    this.subjects.delete(unitId);
  }

  openAlarms(): Alarm[] {
    return this.book.open();
  }

  private heard(unit: UnitRef, tsMs: number, isTelemetry: boolean, s: HealthSettings, arrivalMs?: number): void {
    const now = this.opts.now();
    this.restoredGraceUntil.delete(unit.unitId);
    this.comms.heard(unit.unitId, arrivalMs ?? now, tsMs, isTelemetry);
    // A message clears the unit's comms alarm at once (its clear delay applies).
    this.book.assess(this.subjectOf(unit), 'comms', false, now, timingsOf(s).comms, NO_DETAIL);
  }

  /** The alarm subject of a unit, one per unit reference (the book is asked about it several times per report). */
  private subjectOf(u: UnitRef): AlarmSubject {
    const hit = this.subjects.get(u.unitId);
    if (hit?.ref === u) return hit.subject;
    const subject: AlarmSubject = { unitId: u.unitId, serial: u.serial, siteId: u.siteId };
    this.subjects.set(u.unitId, { ref: u, subject });
    return subject;
  }
}

/** A site's peer readings and trapped-unit count, worked out on first demand and shared for a couple of seconds. */
class SiteSnapshot {
  private levels?: PeerLevels;
  private trappedCount?: number;
  constructor(
    readonly atMs: number,
    public sitePeers: Map<number, PeerReading>,
    private readonly engine: HealthEngine,
  ) {}
  peerLevels(): PeerLevels {
    return (this.levels ??= PeerLevels.of(this.sitePeers.values(), this.atMs));
  }
  trapped(): number {
    return (this.trappedCount ??= [...this.sitePeers.keys()].filter((id) => this.engine.trapHolding(id)).length);
  }
}

/** What the trap detector is told of a report's context; the site-wide figures are asked for only when it needs them. */
class TrapView implements TrapContext {
  constructor(
    readonly model: SiteModel | undefined,
    readonly daylight: boolean,
    private readonly site: SiteSnapshot,
    readonly otherCause: string | null,
    readonly open: boolean,
  ) {}
  get peerLevels(): PeerLevels {
    return this.site.peerLevels();
  }
  get trappedAtSite(): number {
    return this.site.trapped();
  }
}

interface KindTimings {
  stall: AlarmTiming;
  drift: AlarmTiming;
  hunting: AlarmTiming;
  trap: AlarmTiming;
  soiling: AlarmTiming;
  notStowed: AlarmTiming;
  comms: AlarmTiming;
}

/** Each kind's delays under a site's settings, worked out once per settings object (settings are replaced, never edited). */
const timingsBySettings = new WeakMap<HealthSettings, KindTimings>();
function timingsOf(s: HealthSettings): KindTimings {
  let tm = timingsBySettings.get(s);
  if (!tm) {
    tm = {
      stall: timing(s.stallDelayOnMin, s.stallClearDelayMin),
      drift: timing(s.driftDelayOnMin, s.driftClearDelayMin),
      hunting: timing(s.huntingDelayOnMin, s.huntingClearDelayMin),
      trap: timing(s.trapDelayOnMin, s.trapClearDelayMin),
      soiling: timing(s.soilingDelayOnMin, s.soilingClearDelayMin),
      notStowed: timing(s.stowArrivalMin, 0),
      comms: timing(s.commsDelayOnMin, s.commsClearDelayMin),
    };
    timingsBySettings.set(s, tm);
  }
  return tm;
}

const timing = (delayOnMin: number, clearDelayMin: number): AlarmTiming => ({
  delayOnMs: delayOnMin * MIN_MS,
  clearDelayMs: clearDelayMin * MIN_MS,
});
