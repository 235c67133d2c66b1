import type { AlarmLiveItem } from '../../shared/contracts/alarms';
import type { HoldView } from '../../shared/contracts/holds';
import type { CommandView, LiveClientMessage, LiveServerMessage, UnitLiveState } from '../../shared/contracts/live';
import type { Telemetry, UnitStatus } from '../../shared/contracts/wire';
import type { UnitMode } from '../../shared/contracts/wire-format';
import type { Caller } from './caller';
import type { LatestReport } from '../data/telemetry-repository';

/** The fields of a stored report the live picture is rebuilt from. */
export type StoredReport = Omit<LatestReport, 'unitId' | 'receivedAt'>;
import type { UnitDirectory, UnitInfo } from './unit-directory';

export interface LiveSession {
  handle(msg: LiveClientMessage): void;
  close(): void;
}

interface Subscriber {
  caller: Caller;
  send: (msg: LiveServerMessage) => void;
  sites: Set<number>;
  units: Set<number>;
  fleet: boolean;
}

/**
 * Latest state per unit and the dashboards listening to it. Unit state is coalesced and pushed at most once per
 * `coalesceMs` per unit; commands and alarms go out at once. Transport-agnostic: the WebSocket layer feeds it.
 */
export class LiveHub {
  private readonly state = new Map<number, UnitLiveState>();
  private readonly dirty = new Set<number>();
  private readonly lastSent = new Map<number, number>();
  private readonly subscribers = new Set<Subscriber>();
  private timer: NodeJS.Timeout | undefined;

  constructor(
    protected readonly units: UnitDirectory,
    /** Each unit is pushed at most once per slot of this length [ms]. */
    private readonly coalesceMs = 1000,
    /** How often changed units are looked at [ms]; bounds the added latency. */
    private readonly tickMs = 100,
    private readonly now: () => number = Date.now,
  ) {}

  start(): void {
    this.timer = setInterval(() => this.flush(), this.tickMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  get(unitId: number): UnitLiveState | undefined {
    return this.state.get(unitId);
  }

  onTelemetry(unit: UnitInfo, t: Telemetry): void {
    const s = this.ensure(unit);
    // Resent buffers arrive oldest first; only newer reports change the live picture.
    if (s.lastReportAt && t.ts <= s.lastReportAt) return;
    // Field by field (no object per report: every report of the fleet comes through here).
    s.online = true;
    s.lastReportAt = t.ts;
    s.mode = t.mode;
    s.poaWm2 = t.poaWm2;
    s.dcPowerW = t.dcPowerW;
    s.tiltDeg = t.tiltDeg;
    s.azimuthDeg = t.azimuthDeg;
    s.cmdTiltDeg = t.cmdTiltDeg;
    s.cmdAzimuthDeg = t.cmdAzimuthDeg;
    s.tiltDiffWm2 = t.tiltPlusWm2 - t.tiltMinusWm2;
    s.azimuthDiffWm2 = t.azimuthPlusWm2 - t.azimuthMinusWm2;
    s.moduleTempC = t.moduleTempC;
    s.onHold = unit.onHold;
    s.holds = unit.holds;
    this.dirty.add(unit.id);
  }

  /**
   * The last stored report of a unit, at start-up: the board shows what was last known and when, offline until the unit
   * speaks again, instead of "No reports yet" for a unit that has reported before.
   */
  restore(unit: UnitInfo, r: StoredReport): void {
    const s = this.ensure(unit);
    if (s.lastReportAt && s.lastReportAt >= r.ts.toISOString()) return;
    Object.assign(s, {
      online: false,
      lastReportAt: r.ts.toISOString(),
      mode: r.mode as UnitMode,
      poaWm2: r.poaWm2,
      dcPowerW: r.dcPowerW,
      tiltDeg: r.tiltDeg,
      azimuthDeg: r.azimuthDeg,
      cmdTiltDeg: r.cmdTiltDeg,
      cmdAzimuthDeg: r.cmdAzimuthDeg,
      tiltDiffWm2: r.tiltPlusWm2 - r.tiltMinusWm2,
      azimuthDiffWm2: r.azimuthPlusWm2 - r.azimuthMinusWm2,
      moduleTempC: r.moduleTempC,
      onHold: unit.onHold,
    });
  }

  onStatus(unit: UnitInfo, st: UnitStatus): void {
    const s = this.ensure(unit);
    if (s.online !== st.online) {
      s.online = st.online;
      this.dirty.add(unit.id);
    }
  }

  /** The unit's holds changed: its state shows the holders at once (pushed with the next slot). */
  onHoldChanged(unit: UnitInfo): void {
    Object.assign(this.ensure(unit), { onHold: unit.onHold, holds: unit.holds });
    this.dirty.add(unit.id);
  }

  /**
   * The unit directory was reloaded (an admin changed units or sites): states take the current serial, site and holds,
   * and changed units are pushed. Who receives a unit always follows the directory, so a moved unit's updates go to its
   * new owner from now on.
   */
  onDirectoryChanged(): void {
    for (const [id, s] of this.state) {
      const u = this.units.byUnitId(id);
      if (!u || (s.serial === u.serial && s.siteId === u.siteId && sameHolds(s.holds, u.holds))) continue;
      Object.assign(s, { serial: u.serial, siteId: u.siteId, onHold: u.onHold, holds: u.holds });
      this.dirty.add(id);
    }
  }

  /** Command changes reach everyone watching that unit (or its site, or the fleet) at once. */
  publishCommand(command: CommandView): void {
    const unit = this.units.byUnitId(command.unitId);
    if (!unit) return;
    const msg: LiveServerMessage = { type: 'command', command };
    for (const sub of this.subscribers) if (this.watches(sub, unit)) sub.send(msg);
  }

  publishAlarm(unitId: number, alarm: AlarmLiveItem): void {
    const unit = this.units.byUnitId(unitId);
    if (!unit) return;
    const msg: LiveServerMessage = { type: 'alarm', alarm };
    for (const sub of this.subscribers) if (this.watches(sub, unit)) sub.send(msg);
  }

  /** A message for one person only (their notifications), to each of their open dashboards. */
  publishToUser(userId: number, msg: LiveServerMessage): void {
    for (const sub of this.subscribers) if (sub.caller.id === userId) sub.send(msg);
  }

  connect(caller: Caller, send: (msg: LiveServerMessage) => void): LiveSession {
    const sub: Subscriber = { caller, send, sites: new Set(), units: new Set(), fleet: false };
    this.subscribers.add(sub);
    send({ type: 'hello', userId: caller.id, role: caller.role });
    return {
      handle: (msg) => this.handle(sub, msg),
      close: () => this.subscribers.delete(sub),
    };
  }

  private handle(sub: Subscriber, msg: LiveClientMessage): void {
    const on = msg.type === 'subscribe';
    if (msg.fleet) {
      sub.fleet = on;
      if (on) sub.send({ type: 'snapshot', fleet: true, units: this.visible(sub.caller).map((u) => this.ensure(u)) });
    } else if (msg.siteId !== undefined) {
      const units = this.visible(sub.caller).filter((u) => u.siteId === msg.siteId);
      if (!units.length && on) return sub.send({ type: 'error', code: 'not_found', message: `Site ${msg.siteId} not found.` });
      if (on) sub.sites.add(msg.siteId);
      else sub.sites.delete(msg.siteId);
      if (on) sub.send({ type: 'snapshot', siteId: msg.siteId, units: units.map((u) => this.ensure(u)) });
    } else if (msg.unitId !== undefined) {
      const unit = this.visible(sub.caller).find((u) => u.id === msg.unitId);
      if (!unit && on) return sub.send({ type: 'error', code: 'not_found', message: `Unit ${msg.unitId} not found.` });
      if (on) sub.units.add(msg.unitId);
      else sub.units.delete(msg.unitId);
      if (on && unit) sub.send({ type: 'snapshot', unitId: msg.unitId, units: [this.ensure(unit)] });
    } else {
      sub.send({ type: 'error', code: 'bad_message', message: 'Subscribe to one of: fleet, siteId, unitId.' });
    }
  }

  /** Owners see their own units only; everyone else the whole fleet. */
  private visible(caller: Caller): UnitInfo[] {
    const all = this.units.all();
    return caller.role === 'owner' ? all.filter((u) => u.ownerId === caller.ownerId) : all;
  }

  private watches(sub: Subscriber, unit: UnitInfo): boolean {
    if (sub.caller.role === 'owner' && unit.ownerId !== sub.caller.ownerId) return false;
    return sub.fleet || sub.sites.has(unit.siteId) || sub.units.has(unit.id);
  }

  /**
   * Sends each changed unit at most once per `coalesceMs` slot of the clock, batched per subscriber. Slots rather than
   * "1 s since the last push": a unit reporting exactly once a second would otherwise wait a little longer each time.
   */
  flush(): void {
    if (!this.dirty.size || !this.subscribers.size) return;
    const slot = Math.floor(this.now() / this.coalesceMs);
    const due: { unit: UnitInfo; state: UnitLiveState }[] = [];
    for (const id of this.dirty) {
      if (this.lastSent.get(id) === slot) continue;
      this.dirty.delete(id);
      const unit = this.units.byUnitId(id);
      const state = this.state.get(id);
      if (!unit || !state) continue;
      this.lastSent.set(id, slot);
      due.push({ unit, state });
    }
    if (!due.length) return;
    // Fleet subscribers of one scope (every unit, or one owner's) get the same message object, so it is built, and
    // serialized by the socket layer, once per flush rather than once per dashboard.
    const byScope = new Map<string, LiveServerMessage | null>();
    for (const sub of this.subscribers) {
      const scope = sub.fleet ? (sub.caller.role === 'owner' ? `owner:${sub.caller.ownerId}` : 'all') : undefined;
      let msg = scope === undefined ? undefined : byScope.get(scope);
      if (msg === undefined) {
        const units = due.filter((d) => this.watches(sub, d.unit)).map((d) => d.state);
        msg = units.length ? { type: 'units', units } : null;
        if (scope !== undefined) byScope.set(scope, msg);
      }
      if (msg) sub.send(msg);
    }
  }

  private ensure(unit: UnitInfo): UnitLiveState {
    let s = this.state.get(unit.id);
    if (!s) {
      s = {
        unitId: unit.id,
        serial: unit.serial,
        siteId: unit.siteId,
        online: false,
        lastReportAt: null,
        mode: null,
        poaWm2: null,
        dcPowerW: null,
        tiltDeg: null,
        azimuthDeg: null,
        cmdTiltDeg: null,
        cmdAzimuthDeg: null,
        tiltDiffWm2: null,
        azimuthDiffWm2: null,
        moduleTempC: null,
        onHold: unit.onHold,
        holds: unit.holds,
      };
      this.state.set(unit.id, s);
    }
    return s;
  }
}

const sameHolds = (a: readonly HoldView[], b: readonly HoldView[]) => a.length === b.length && a.every((h, i) => h.id === b[i]!.id);
