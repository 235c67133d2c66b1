/**
 * One virtual unit: actuator, detectors, controller, modes, commands and its store-and-forward outbox. Pure and steppable:
 * it reads the site's conditions, moves, and queues the messages a field unit would send (telemetry, events, acks,
 * weather). It never touches the network; whoever carries its messages reports whether its link is up.
 * Fault magnitudes are in fault-effects.ts, command preconditions in unit-commands.ts, the scan raster in unit-scan.ts,
 * the wire encoding in unit-messages.ts.
 */
import type { Command, CommandAck, Telemetry, UnitConfig, UnitEvent, Weather } from '../shared/contracts/wire';
import type { UnitMode } from '../shared/contracts/wire-format';
import { atTarget, createAxis, setTarget, stepAxis, type AxisSpec, type AxisState } from './actuator';
import { controlStep, DEFAULT_CONTROLLER, type ControllerConfig } from './controller';
import { createDetectorSet, readDetectors, type DetectorSet, type Readings } from './detectors';
import { axisOf, FAULT_EFFECTS, noFaultEffects, stepSlowFaults, type FaultEffectState } from './fault-effects';
import type { ActiveFault, FaultKind } from './faults';
import type { Rng } from './rng';
import type { SiteConditions } from './scenarios';
import { StoreAndForward } from './store-and-forward';
import { commandRefusal } from './unit-commands';
import { ackPayload, eventPayload, r1, telemetryPayload, weatherPayload } from './unit-messages';
import { newScan, SCAN_DWELL_S, takeScanSample, type ScanState } from './unit-scan';
import { MODULE_POWER_TEMP_COEFF_PER_K as TEMP_COEFF_PER_K } from '../shared/contracts/pv-module';

export interface UnitSpec {
  serial: string;
  siteCode: string;
  firmware?: string;
  ratedPowerWp?: number;
  tilt?: AxisSpec;
  azimuth?: AxisSpec;
  /** Initial wear of both axes, 0…1. */
  wear?: number;
  controller?: Partial<ControllerConfig>;
  /** Gust speed above which the unit stows itself [m/s]. */
  stowGustMs?: number;
  /** Gusts must stay below the limit this long before the unit leaves wind stow [min]. */
  stowReleaseMinutes?: number;
  /** Whether this unit carries the site's weather station. */
  weatherStation?: boolean;
  weatherIntervalS?: number;
  start?: { tiltDeg: number; azimuthDeg: number };
  /** Outbox capacity while disconnected [messages]. */
  bufferCapacity?: number;
}

export type OutboundLeaf = 'telemetry' | 'events' | 'acks' | 'weather';
export type OutboundMessage =
  | { serial: string; leaf: 'telemetry'; payload: Telemetry }
  | { serial: string; leaf: 'events'; payload: UnitEvent }
  | { serial: string; leaf: 'acks'; payload: CommandAck }
  | { serial: string; leaf: 'weather'; payload: Weather };

/** Energy counters of the unit [Wh/m² of plane-of-array irradiation, Wh of DC energy]. */
export interface UnitEnergy {
  poaWhm2: number;
  dcWh: number;
}

export const DEFAULT_TILT_AXIS: AxisSpec = { minDeg: 0, maxDeg: 85, speedDegS: 4, backlashDeg: 0.3 };
export const DEFAULT_AZIMUTH_AXIS: AxisSpec = { minDeg: 0, maxDeg: 360, speedDegS: 4, backlashDeg: 0.4 };
const SETTLE_AFTER_S = 30;
const STALL_AFTER_S = 20;
const NOCT_RISE_K_PER_WM2 = (45 - 20) / 800; // NOCT 45 °C model, common practice
const STOW_TILT_DEG = 0;

export class VirtualUnit {
  readonly serial: string;
  readonly siteCode: string;
  readonly firmware: string;
  readonly ratedPowerWp: number;
  readonly tiltSpec: AxisSpec;
  readonly azimuthSpec: AxisSpec;
  readonly tilt: AxisState;
  readonly azimuth: AxisState;
  readonly detectors: DetectorSet;
  config: ControllerConfig;
  readonly outbox: StoreAndForward<OutboundMessage>;
  readonly energy: UnitEnergy = { poaWhm2: 0, dcWh: 0 };
  readonly weatherStation: boolean;
  /** Whether the transport (MQTT connection) is up; offline runs leave it true. */
  transportUp = true;
  seq = 0;
  mode: UnitMode = 'seeking';
  held = false;
  manualStow = false;
  windStow = false;
  faultCode: string | null = null;
  faults: ActiveFault[] = [];
  /** Panel transmittance after soiling (1 = clean). */
  soiling = 1;
  last: Readings | null = null;
  lastDcW = 0;
  lastModuleTempC = 20;

  private readonly rng: Rng;
  private readonly stowGustMs: number;
  private readonly stowReleaseS: number;
  private readonly weatherIntervalS: number;
  private calmS = 0;
  private balancedS = 0;
  private anchor: [number, number] = [NaN, NaN];
  private stuckS = 0;
  private lastReportMs = -Infinity;
  private lastWeatherMs = -Infinity;
  private scan: ScanState | null = null;
  private gotoCmd: { commandId: string | null } | null = null;
  private stowCmd: string | null = null;
  private readonly fx: FaultEffectState = noFaultEffects();

  constructor(spec: UnitSpec, rng: Rng, nowMs: number) {
    this.serial = spec.serial;
    this.siteCode = spec.siteCode;
    this.firmware = spec.firmware ?? '2.4.1';
    this.ratedPowerWp = spec.ratedPowerWp ?? 420;
    this.tiltSpec = spec.tilt ?? DEFAULT_TILT_AXIS;
    this.azimuthSpec = spec.azimuth ?? DEFAULT_AZIMUTH_AXIS;
    this.rng = rng;
    const start = spec.start ?? { tiltDeg: 0, azimuthDeg: 180 };
    this.tilt = createAxis(this.tiltSpec, start.tiltDeg, spec.wear ?? 0);
    this.azimuth = createAxis(this.azimuthSpec, start.azimuthDeg, spec.wear ?? 0);
    this.detectors = createDetectorSet(rng.fork('detectors'));
    this.config = { ...DEFAULT_CONTROLLER, ...spec.controller };
    this.outbox = new StoreAndForward(spec.bufferCapacity ?? 20_000);
    this.stowGustMs = spec.stowGustMs ?? 18;
    this.stowReleaseS = (spec.stowReleaseMinutes ?? 10) * 60;
    this.weatherStation = spec.weatherStation ?? false;
    this.weatherIntervalS = spec.weatherIntervalS ?? 30;
    this.event(nowMs, { kind: 'boot', message: `firmware ${this.firmware}` });
  }

  /** Whether messages can leave the unit now. */
  get linkUp(): boolean {
    return this.transportUp && !this.fx.commsDown;
  }

  /** Whether a comms-loss fault has cut the unit off (its transport should drop). */
  get commsLost(): boolean {
    return this.fx.commsDown;
  }

  /** Answers a command that could not be read (bad payload) with a rejection. */
  rejectCommand(commandId: string, reason: string, nowMs: number): void {
    this.ack(nowMs, commandId, 'rejected', reason);
  }

  /** Detector tilt in effect (a fault can change it). */
  get detectorTiltDeg(): number {
    return this.fx.detectorTiltOverride ?? this.config.detectorTiltDeg;
  }

  /** Advances the unit by dt seconds under the site's conditions at `c.unixMs`. */
  step(c: SiteConditions, dtS: number): void {
    const now = c.unixMs;
    this.applyWind(c, dtS, now);
    this.soiling = stepSlowFaults(this.fx, this.detectors.drift, this.soiling, dtS);
    // Sense at the structure's true orientation.
    const r = readDetectors(c.field, this.detectors, this.tilt.trueDeg, this.azimuth.trueDeg, this.detectorTiltDeg, this.rng);
    this.last = r;
    // Decide where to go.
    if (this.faultCode !== null || this.held) {
      this.holdPosition();
    } else if (this.fx.stuckStowed || this.manualStow || this.windStow) {
      setTarget(this.tiltSpec, this.tilt, STOW_TILT_DEG);
      setTarget(this.azimuthSpec, this.azimuth, this.azimuth.encoderDeg);
    } else if (this.scan) {
      this.stepScan(r, dtS, now);
    } else if (this.gotoCmd) {
      // target already set; wait for arrival
    } else {
      const cfg =
        this.fx.deadbandOverride === null && this.fx.gainFactor === 1
          ? this.config
          : {
              ...this.config,
              gain: this.config.gain * this.fx.gainFactor,
              deadbandWm2: this.fx.deadbandOverride ?? this.config.deadbandWm2,
            };
      const out = controlStep(cfg, r, this.tilt.encoderDeg, dtS);
      setTarget(this.tiltSpec, this.tilt, this.tilt.encoderDeg + out.dTiltDeg);
      setTarget(this.azimuthSpec, this.azimuth, this.azimuth.encoderDeg + out.dAzimuthDeg);
      // Settled = no net motion beyond 1° for a while (noise flicking across the deadband, or pushing against a
      // travel limit, does not count as seeking).
      if (Math.abs(this.tilt.encoderDeg - this.anchor[0]) > 1 || Math.abs(this.azimuth.encoderDeg - this.anchor[1]) > 1) {
        this.anchor = [this.tilt.encoderDeg, this.azimuth.encoderDeg];
        this.balancedS = 0;
      } else this.balancedS += dtS;
    }
    // Move.
    stepAxis(this.tiltSpec, this.tilt, dtS);
    stepAxis(this.azimuthSpec, this.azimuth, dtS);
    this.detectStall(dtS, now);
    this.finishMotions(now);
    // Power and energy.
    const moduleTempC = c.weather.airTempC + r.truePoaWm2 * NOCT_RISE_K_PER_WM2;
    const dcW = this.ratedPowerWp * (r.truePoaWm2 / 1000) * this.soiling * (1 + TEMP_COEFF_PER_K * (moduleTempC - 25));
    this.lastDcW = Math.max(0, dcW);
    this.lastModuleTempC = moduleTempC;
    this.energy.poaWhm2 += (r.truePoaWm2 * dtS) / 3600;
    this.energy.dcWh += (this.lastDcW * dtS) / 3600;
    this.updateMode(now);
    if (now - this.lastReportMs >= this.config.reportIntervalS * 1000 - 1e-6) {
      this.lastReportMs = now;
      this.report(now, r);
    }
    if (this.weatherStation && now - this.lastWeatherMs >= this.weatherIntervalS * 1000 - 1e-6) {
      this.lastWeatherMs = now;
      this.outbox.push({ serial: this.serial, leaf: 'weather', payload: weatherPayload(now, c.weather) });
    }
  }

  /** Takes a command from the server; answers with acks in the outbox. */
  handleCommand(cmd: Command, nowMs: number): void {
    const id = cmd.commandId;
    const refusal = commandRefusal(cmd, {
      held: this.held,
      faultCode: this.faultCode,
      manualStow: this.manualStow,
      windStow: this.windStow,
      stuckStowed: this.fx.stuckStowed,
      stowGustMs: this.stowGustMs,
      tiltSpec: this.tiltSpec,
      azimuthSpec: this.azimuthSpec,
      tiltEncoderDeg: this.tilt.encoderDeg,
      azimuthEncoderDeg: this.azimuth.encoderDeg,
    });
    if (refusal !== null) return this.ack(nowMs, id, 'rejected', refusal);
    switch (cmd.kind) {
      case 'hold':
        this.ack(nowMs, id, 'accepted');
        this.cancelMotions(nowMs, 'cancelled by maintenance hold');
        this.held = true;
        this.holdPosition();
        this.ack(nowMs, id, 'done');
        break;
      case 'release-hold':
        this.ack(nowMs, id, 'accepted');
        this.held = false;
        this.balancedS = 0;
        this.ack(nowMs, id, 'done');
        break;
      case 'stow':
        this.ack(nowMs, id, 'accepted');
        this.cancelMotions(nowMs, 'cancelled by stow');
        this.manualStow = true;
        this.stowCmd = id;
        break;
      case 'release-stow':
        this.ack(nowMs, id, 'accepted');
        if (this.fx.stuckStowed) return; // firmware stuck in stow: accepts, never completes
        this.manualStow = false;
        this.stowCmd = null;
        this.balancedS = 0;
        this.ack(nowMs, id, 'done');
        break;
      case 'goto':
        this.ack(nowMs, id, 'accepted');
        this.cancelMotions(nowMs, 'superseded by goto');
        this.startGoto(cmd.tiltDeg ?? this.tilt.encoderDeg, cmd.azimuthDeg ?? this.azimuth.encoderDeg, id);
        break;
      case 'scan':
        this.ack(nowMs, id, 'accepted');
        this.cancelMotions(nowMs, 'superseded by scan');
        this.startScan(id);
        break;
      case 'configure':
        this.ack(nowMs, id, 'accepted');
        this.applyConfig(cmd.config!);
        this.ack(nowMs, id, 'done');
        break;
    }
  }

  applyConfig(c: UnitConfig): void {
    this.config = {
      ...this.config,
      ...(c.detectorTiltDeg !== undefined ? { detectorTiltDeg: c.detectorTiltDeg } : {}),
      ...(c.gain !== undefined ? { gain: c.gain } : {}),
      ...(c.deadbandWm2 !== undefined ? { deadbandWm2: c.deadbandWm2 } : {}),
      ...(c.reportIntervalS !== undefined ? { reportIntervalS: c.reportIntervalS } : {}),
    };
  }

  /** Begins an injected fault. */
  startFault(f: ActiveFault, _nowMs: number): void {
    this.faults.push(f);
    switch (f.kind) {
      case 'trap': {
        const e = FAULT_EFFECTS.trap;
        this.fx.detectorTiltOverride = e.detectorTiltDeg;
        const m = e.restartAzimuthMarginDeg;
        this.startGoto(
          this.rng.uniform(e.restartTiltDeg[0], e.restartTiltDeg[1]),
          this.rng.uniform(this.azimuthSpec.minDeg + m, this.azimuthSpec.maxDeg - m),
          null,
        );
        break;
      }
      case 'stall':
        axisOf(f.target, this.tilt, this.azimuth).stalled = true;
        break;
      case 'slip':
        axisOf(f.target, this.tilt, this.azimuth).slipFraction = FAULT_EFFECTS.slip.fraction;
        break;
      case 'drift':
        this.fx.driftDetector = f.target % 4;
        this.fx.driftRatePerS = -FAULT_EFFECTS.drift.lossPerHour / 3600;
        break;
      case 'dead-detector':
        this.detectors.dead[f.target % 4] = true;
        break;
      case 'hunting':
        this.fx.gainFactor = FAULT_EFFECTS.hunting.gainFactor;
        this.fx.deadbandOverride = FAULT_EFFECTS.hunting.deadbandWm2;
        break;
      case 'comms-loss':
        this.fx.commsDown = true;
        break;
      case 'soiling':
        this.fx.soilingRatePerS = FAULT_EFFECTS.soiling.lossPerDay / 86_400;
        break;
      case 'stuck-mode':
        this.fx.stuckStowed = true;
        break;
    }
  }

  /** Ends an injected fault (repair, recalibration, cleaning, link restored). */
  endFault(f: ActiveFault, nowMs: number): void {
    this.faults = this.faults.filter((x) => x !== f);
    switch (f.kind) {
      case 'trap':
        this.fx.detectorTiltOverride = null;
        break;
      case 'stall': {
        const ax = axisOf(f.target, this.tilt, this.azimuth);
        ax.stalled = false;
        if (this.faultCode === 'actuator-stall') {
          this.faultCode = null;
          this.stuckS = 0;
          this.event(nowMs, { kind: 'fault-cleared', code: 'actuator-stall', message: 'actuator moving again' });
        }
        break;
      }
      case 'slip': {
        const ax = axisOf(f.target, this.tilt, this.azimuth);
        ax.slipFraction = 0;
        ax.slipOffsetDeg = 0;
        ax.trueDeg = ax.encoderDeg; // re-homed
        break;
      }
      case 'drift':
        this.detectors.drift = [1, 1, 1, 1];
        this.fx.driftRatePerS = 0;
        this.fx.driftDetector = -1;
        break;
      case 'dead-detector':
        this.detectors.dead[f.target % 4] = false;
        break;
      case 'hunting':
        this.fx.gainFactor = 1;
        this.fx.deadbandOverride = null;
        break;
      case 'comms-loss':
        this.fx.commsDown = false;
        break;
      case 'soiling':
        this.fx.soilingRatePerS = 0;
        this.soiling = 1; // cleaned
        break;
      case 'stuck-mode':
        this.fx.stuckStowed = false;
        break;
    }
  }

  hasFault(kind: FaultKind): boolean {
    return this.faults.some((f) => f.kind === kind);
  }

  // ---- internals ----

  private applyWind(c: SiteConditions, dtS: number, now: number): void {
    const gust = c.weather.gustMs;
    if (gust > this.stowGustMs) {
      this.calmS = 0;
      if (!this.windStow && !this.held) {
        this.windStow = true;
        this.cancelMotions(now, 'interrupted by wind stow');
        this.event(now, {
          kind: 'mode-change',
          mode: 'stowed',
          code: 'wind-stow',
          message: `gust ${gust.toFixed(1)} m/s above stow limit ${this.stowGustMs} m/s`,
        });
      }
    } else if (this.windStow) {
      this.calmS += dtS;
      if (this.calmS >= this.stowReleaseS) {
        this.windStow = false;
        this.balancedS = 0;
        this.event(now, {
          kind: 'mode-change',
          code: 'wind-stow-released',
          message: `gusts below ${this.stowGustMs} m/s for ${this.stowReleaseS / 60} min`,
        });
      }
    }
  }

  private holdPosition(): void {
    this.tilt.targetDeg = this.tilt.encoderDeg;
    this.azimuth.targetDeg = this.azimuth.encoderDeg;
  }

  private startGoto(tiltDeg: number, azimuthDeg: number, commandId: string | null): void {
    setTarget(this.tiltSpec, this.tilt, tiltDeg);
    setTarget(this.azimuthSpec, this.azimuth, azimuthDeg);
    this.gotoCmd = { commandId };
    this.balancedS = 0;
  }

  private startScan(commandId: string): void {
    this.scan = newScan(commandId, this.tiltSpec, this.azimuthSpec);
    const w = this.scan.waypoints;
    setTarget(this.tiltSpec, this.tilt, w[0]![0]);
    setTarget(this.azimuthSpec, this.azimuth, w[0]![1]);
  }

  private stepScan(r: Readings, dtS: number, now: number): void {
    const s = this.scan!;
    if (!(atTarget(this.tilt, 0.2) && atTarget(this.azimuth, 0.2))) return;
    s.dwellS += dtS;
    if (s.dwellS < SCAN_DWELL_S) return;
    const [t, a] = s.waypoints[s.index]!;
    const { row, best, next } = takeScanSample(s, [t, a, r1(r.poaWm2)]);
    if (row) this.event(now, { kind: 'scan-samples', commandId: s.commandId, samples: row });
    if (best) {
      this.event(now, {
        kind: 'scan-complete',
        commandId: s.commandId,
        message: `${s.all.length} samples; brightest ${best[2]} W/m² at tilt ${best[0]}°, azimuth ${best[1]}°`,
      });
      this.scan = null;
      this.ack(now, s.commandId, 'done');
      this.startGoto(best[0], best[1], null); // continue climbing from the brightest sample
      return;
    }
    setTarget(this.tiltSpec, this.tilt, next![0]);
    setTarget(this.azimuthSpec, this.azimuth, next![1]);
  }

  private finishMotions(now: number): void {
    const arrived = atTarget(this.tilt, 0.05) && atTarget(this.azimuth, 0.05);
    if (this.gotoCmd && arrived && !this.held && this.faultCode === null) {
      if (this.gotoCmd.commandId) this.ack(now, this.gotoCmd.commandId, 'done');
      this.gotoCmd = null;
    }
    if (this.stowCmd && this.manualStow && arrived) {
      this.ack(now, this.stowCmd, 'done');
      this.stowCmd = null;
    }
  }

  private cancelMotions(now: number, reason: string): void {
    if (this.scan) {
      this.ack(now, this.scan.commandId, 'rejected', reason);
      this.event(now, {
        kind: 'scan-complete',
        commandId: this.scan.commandId,
        message: `scan ${reason} after ${this.scan.all.length} samples`,
      });
      this.scan = null;
    }
    if (this.gotoCmd) {
      if (this.gotoCmd.commandId) this.ack(now, this.gotoCmd.commandId, 'rejected', reason);
      this.gotoCmd = null;
    }
    if (this.stowCmd && reason !== 'cancelled by stow') {
      this.ack(now, this.stowCmd, 'rejected', reason);
      this.stowCmd = null;
    }
  }

  private detectStall(dtS: number, now: number): void {
    // The unit sees a commanded axis whose encoder does not move.
    const stuck = (ax: AxisState) => ax.stalled && Math.abs(ax.targetDeg - ax.encoderDeg) > 0.2;
    if (stuck(this.tilt) || stuck(this.azimuth)) this.stuckS += dtS;
    else this.stuckS = 0;
    if (this.faultCode === null && this.stuckS >= STALL_AFTER_S) {
      const ax = this.tilt.stalled ? this.tilt : this.azimuth;
      this.faultCode = 'actuator-stall';
      this.cancelMotions(now, 'actuator stall');
      this.event(now, {
        kind: 'fault',
        code: 'actuator-stall',
        message: `${this.tilt.stalled ? 'tilt' : 'azimuth'} axis does not move (motor ${ax.currentA.toFixed(1)} A)`,
      });
    }
  }

  private updateMode(now: number): void {
    let m: UnitMode;
    if (this.faultCode !== null) m = 'fault';
    else if (this.held) m = 'held';
    else if (this.fx.stuckStowed || this.manualStow || this.windStow) m = 'stowed';
    else if (this.scan) m = 'scanning';
    else if (this.gotoCmd) m = 'seeking';
    else m = this.balancedS >= SETTLE_AFTER_S ? 'settled' : 'seeking';
    if (m !== this.mode) {
      this.mode = m;
      this.event(now, { kind: 'mode-change', mode: m });
    }
  }

  private report(now: number, r: Readings): void {
    const payload: Telemetry = telemetryPayload(now, {
      seq: this.seq++,
      readings: r,
      tilt: this.tilt,
      azimuth: this.azimuth,
      dcW: this.lastDcW,
      moduleTempC: this.lastModuleTempC,
      mode: this.mode,
      firmware: this.firmware,
    });
    this.outbox.push({ serial: this.serial, leaf: 'telemetry', payload });
  }

  private event(now: number, e: Omit<UnitEvent, 'v' | 'ts'>): void {
    this.outbox.push({ serial: this.serial, leaf: 'events', payload: eventPayload(now, e) });
  }

  private ack(now: number, commandId: string, result: CommandAck['result'], reason?: string): void {
    this.outbox.push({ serial: this.serial, leaf: 'acks', payload: ackPayload(now, commandId, result, reason) });
  }
}
