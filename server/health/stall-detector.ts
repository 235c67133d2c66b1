/**
 * Actuator stall or slip, per axis: the drive is commanded but the measured angle does not follow (error beyond a
 * threshold with no progress between reports), or the motor draws more than the anomaly current, or the unit itself
 * reports an actuator fault. Evidence must repeat (three sightings within two minutes) before it counts; an axis is
 * healthy again once it is seen moving at normal current. A unit that is not asked to move gives no evidence either way.
 */
import type { Telemetry, UnitEvent } from '../../shared/contracts/wire';
import type { HealthSettings } from './health-settings';
import { azimuthDelta, judged, readingsSnapshot, round1, type Assessment, type UnitRef } from './unit-sample';

const AXES = ['tilt', 'azimuth'] as const;
type Axis = (typeof AXES)[number];
const EVIDENCE_WINDOW_MS = 120_000;
const EVIDENCE_COUNT = 3;

interface AxisState {
  evidenceMs: number[];
  stalled: boolean;
  lastWhy: string;
}

interface UnitState {
  prev: { tiltDeg: number; azimuthDeg: number; atMs: number } | null;
  axes: Record<Axis, AxisState>;
  faultCode: string | null;
}

/** Unit fault codes that mean the drive cannot move. */
export const ACTUATOR_FAULT = /stall|obstruct|actuator|motor/i;

export class StallDetector {
  private readonly units = new Map<number, UnitState>();

  private state(unitId: number): UnitState {
    let u = this.units.get(unitId);
    if (!u) {
      u = {
        prev: null,
        axes: { tilt: { evidenceMs: [], stalled: false, lastWhy: '' }, azimuth: { evidenceMs: [], stalled: false, lastWhy: '' } },
        faultCode: null,
      };
      this.units.set(unitId, u);
    }
    return u;
  }

  event(unit: UnitRef, e: UnitEvent): void {
    const u = this.state(unit.unitId);
    if (e.kind === 'fault' && e.code) u.faultCode = e.code;
    if (e.kind === 'fault-cleared') u.faultCode = null;
  }

  /** `duringStow`: the site is in a wind stow (a stall is then critical). */
  assess(unit: UnitRef, t: Telemetry, atMs: number, s: HealthSettings, duringStow = false): Assessment {
    const u = this.state(unit.unitId);
    const prev = u.prev && atMs > u.prev.atMs ? u.prev : null;
    u.prev = { tiltDeg: t.tiltDeg, azimuthDeg: t.azimuthDeg, atMs };
    const unitFault = t.mode === 'fault' && u.faultCode !== null && ACTUATOR_FAULT.test(u.faultCode);
    if (t.mode !== 'fault' && u.faultCode !== null) u.faultCode = null;
    for (const axis of AXES) {
      const a = u.axes[axis];
      const err = axis === 'tilt' ? Math.abs(t.cmdTiltDeg - t.tiltDeg) : Math.abs(azimuthDelta(t.azimuthDeg, t.cmdAzimuthDeg));
      const currentA = Math.abs(axis === 'tilt' ? t.tiltMotorA : t.azimuthMotorA);
      const progress = prev
        ? axis === 'tilt'
          ? Math.abs(t.tiltDeg - prev.tiltDeg)
          : Math.abs(azimuthDelta(prev.azimuthDeg, t.azimuthDeg))
        : NaN;
      const over = currentA >= s.motorOverCurrentA;
      const noProgress = err > s.stallAngleErrorDeg && progress < s.stallNoProgressDeg;
      if (over || noProgress) {
        a.evidenceMs.push(atMs);
        a.lastWhy = over
          ? `motor current ${round1(currentA)} A (anomaly above ${s.motorOverCurrentA} A)`
          : `commanded ${round1(err)}° away with no progress`;
      } else if (progress >= s.stallNoProgressDeg && !unitFault) {
        a.stalled = false;
        a.evidenceMs = [];
      }
      while (a.evidenceMs.length && atMs - a.evidenceMs[0]! > EVIDENCE_WINDOW_MS) a.evidenceMs.shift();
      if (a.evidenceMs.length >= EVIDENCE_COUNT) a.stalled = true;
    }
    const stalledAxes = AXES.filter((x) => u.axes[x].stalled);
    if (unitFault || stalledAxes.length) {
      return judged(true, () => ({
        severity: duringStow ? 'P1' : 'P2',
        message: `${stalledAxes.length ? stalledAxes.map((x) => `${x} axis: ${u.axes[x].lastWhy}`).join('; ') : 'drive fault'}${unitFault ? ` (the unit reports fault code ${u.faultCode})` : ''}.`,
        advice: `${duringStow ? 'The site is in a wind stow: keep people away. ' : ''}Check the drive, gearbox and limit switches for obstruction or wear; a remote “Go to orientation” command can confirm, but put the unit on hold before anyone touches it.`,
        evidence: { readings: readingsSnapshot(t), axes: stalledAxes, unitFaultCode: u.faultCode, duringStow },
      }));
    }
    // Both axes seen healthy (or never suspected): no stall. Otherwise wait for motion to judge.
    const anyEvidence = AXES.some((x) => u.axes[x].evidenceMs.length > 0);
    return judged(anyEvidence ? null : false);
  }

  forget(unitId: number): void {
    this.units.delete(unitId);
  }
}
