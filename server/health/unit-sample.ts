/** The unit as the detectors know it, and small helpers they share. */
import type { Telemetry } from '../../shared/contracts/wire';
import type { AlarmDetail } from './alarm-types';

export interface UnitRef {
  unitId: number;
  serial: string;
  siteId: number;
  /** Detector tilt δ configured on the unit [°]. */
  detectorTiltDeg: number;
  /** Whether the unit is on maintenance hold (the server's record; telemetry mode 'held' counts too). */
  onHold?: boolean;
}

/** A detector's verdict at one instant: the condition holds, does not hold, or cannot be judged (null). */
export interface Assessment {
  condition: boolean | null;
  detail: () => AlarmDetail;
}

export const NO_DETAIL = (): AlarmDetail => ({ severity: 'P4', message: '', advice: '', evidence: {} });
/** The answers without detail, made once (every detector gives one on every report). */
const HOLDS: Assessment = Object.freeze({ condition: true, detail: NO_DETAIL });
const ABSENT: Assessment = Object.freeze({ condition: false, detail: NO_DETAIL });
const UNKNOWN: Assessment = Object.freeze({ condition: null, detail: NO_DETAIL });
export const judged = (condition: boolean | null, detail: () => AlarmDetail = NO_DETAIL): Assessment =>
  detail !== NO_DETAIL ? { condition, detail } : condition === true ? HOLDS : condition === false ? ABSENT : UNKNOWN;

/** Telemetry fields kept in an evidence snapshot. */
export function readingsSnapshot(t: Telemetry) {
  const {
    ts,
    mode,
    poaWm2,
    tiltDeg,
    azimuthDeg,
    cmdTiltDeg,
    cmdAzimuthDeg,
    tiltPlusWm2,
    tiltMinusWm2,
    azimuthPlusWm2,
    azimuthMinusWm2,
    tiltMotorA,
    azimuthMotorA,
    dcPowerW,
    moduleTempC,
  } = t;
  return {
    ts,
    mode,
    poaWm2,
    tiltDeg,
    azimuthDeg,
    cmdTiltDeg,
    cmdAzimuthDeg,
    tiltPlusWm2,
    tiltMinusWm2,
    azimuthPlusWm2,
    azimuthMinusWm2,
    tiltMotorA,
    azimuthMotorA,
    dcPowerW,
    moduleTempC,
  };
}

/** Signed smallest difference b − a of two azimuths [°], in (−180, 180]. */
export function azimuthDelta(a: number, b: number): number {
  const d = ((((b - a) % 360) + 540) % 360) - 180;
  return d === -180 ? 180 : d;
}

export function median(xs: readonly number[]): number {
  return quantile(xs, 0.5);
}

/** Linear-interpolated quantile q ∈ [0, 1]; NaN for an empty list. */
export function quantile(xs: readonly number[], q: number): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const pos = (s.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return s[lo]! + (s[hi]! - s[lo]!) * (pos - lo);
}

export const round1 = (x: number) => Math.round(x * 10) / 10;
export const MOTION_FREE_MODES = new Set(['stowed', 'held', 'fault', 'scanning']);
