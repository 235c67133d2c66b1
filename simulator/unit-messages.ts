/**
 * What a unit puts on the wire: telemetry, weather, events and acks, rounded and clamped to the wire's ranges the way a
 * field unit's firmware encodes them.
 */
import type { CommandAck, Telemetry, UnitEvent, Weather } from '../shared/contracts/wire';
import type { UnitMode } from '../shared/contracts/wire-format';
import { clamp, type AxisState } from './actuator';
import { isoUtc } from './clock';
import type { Readings } from './detectors';
import type { WeatherNow } from './scenarios';
import { WIRE_RANGES as R, WIRE_VERSION } from '../shared/contracts/wire-format';

export const r1 = (x: number) => Math.round(x * 10) / 10;
export const r2 = (x: number) => Math.round(x * 100) / 100;

export interface TelemetryState {
  seq: number;
  readings: Readings;
  tilt: AxisState;
  azimuth: AxisState;
  dcW: number;
  moduleTempC: number;
  mode: UnitMode;
  firmware: string;
}

export function telemetryPayload(nowMs: number, u: TelemetryState): Telemetry {
  const r = u.readings;
  return {
    v: WIRE_VERSION,
    seq: u.seq,
    ts: isoUtc(nowMs),
    tiltPlusWm2: r1(clamp(r.tiltPlusWm2, ...R.irradianceWm2)),
    tiltMinusWm2: r1(clamp(r.tiltMinusWm2, ...R.irradianceWm2)),
    azimuthPlusWm2: r1(clamp(r.azimuthPlusWm2, ...R.irradianceWm2)),
    azimuthMinusWm2: r1(clamp(r.azimuthMinusWm2, ...R.irradianceWm2)),
    poaWm2: r1(clamp(r.poaWm2, ...R.irradianceWm2)),
    tiltDeg: r2(clamp(u.tilt.encoderDeg, ...R.tiltDeg)),
    azimuthDeg: r2(clamp(u.azimuth.encoderDeg, ...R.azimuthDeg)),
    cmdTiltDeg: r2(clamp(u.tilt.targetDeg, ...R.tiltDeg)),
    cmdAzimuthDeg: r2(clamp(u.azimuth.targetDeg, ...R.azimuthDeg)),
    tiltMotorA: r2(u.tilt.currentA),
    azimuthMotorA: r2(u.azimuth.currentA),
    dcPowerW: r1(u.dcW),
    moduleTempC: r1(clamp(u.moduleTempC, ...R.moduleTempC)),
    mode: u.mode,
    firmware: u.firmware,
  };
}

export function weatherPayload(nowMs: number, w: WeatherNow): Weather {
  return {
    v: WIRE_VERSION,
    ts: isoUtc(nowMs),
    ghiWm2: r1(clamp(w.ghiWm2, ...R.ghiWm2)),
    dhiWm2: r1(clamp(w.dhiWm2, ...R.dhiWm2)),
    airTempC: r1(w.airTempC),
    windMs: r1(w.windMs),
    gustMs: r1(w.gustMs),
  };
}

export function eventPayload(nowMs: number, e: Omit<UnitEvent, 'v' | 'ts'>): UnitEvent {
  return { v: WIRE_VERSION, ts: isoUtc(nowMs), ...e };
}

export function ackPayload(nowMs: number, commandId: string, result: CommandAck['result'], reason?: string): CommandAck {
  return { v: WIRE_VERSION, commandId, ts: isoUtc(nowMs), result, ...(reason ? { reason } : {}) };
}
