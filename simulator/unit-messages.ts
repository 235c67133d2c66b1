/**
 * What a unit puts on the wire: telemetry, weather, events and acks, rounded and clamped to the wire's ranges the way a
 * field unit's firmware encodes them.
 */
import type { CommandAck, Telemetry, UnitEvent, UnitMode, Weather } from '../shared/contracts/wire';
import { clamp, type AxisState } from './actuator';
import { isoUtc } from './clock';
import type { Readings } from './detectors';
import type { WeatherNow } from './scenarios';

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
    v: 1,
    seq: u.seq,
    ts: isoUtc(nowMs),
    tiltPlusWm2: r1(clamp(r.tiltPlusWm2, -50, 5000)),
    tiltMinusWm2: r1(clamp(r.tiltMinusWm2, -50, 5000)),
    azimuthPlusWm2: r1(clamp(r.azimuthPlusWm2, -50, 5000)),
    azimuthMinusWm2: r1(clamp(r.azimuthMinusWm2, -50, 5000)),
    poaWm2: r1(clamp(r.poaWm2, -50, 5000)),
    tiltDeg: r2(clamp(u.tilt.encoderDeg, -5, 95)),
    azimuthDeg: r2(clamp(u.azimuth.encoderDeg, -360, 720)),
    cmdTiltDeg: r2(clamp(u.tilt.targetDeg, -5, 95)),
    cmdAzimuthDeg: r2(clamp(u.azimuth.targetDeg, -360, 720)),
    tiltMotorA: r2(u.tilt.currentA),
    azimuthMotorA: r2(u.azimuth.currentA),
    dcPowerW: r1(u.dcW),
    moduleTempC: r1(clamp(u.moduleTempC, -60, 120)),
    mode: u.mode,
    firmware: u.firmware,
  };
}

export function weatherPayload(nowMs: number, w: WeatherNow): Weather {
  return { v: 1, ts: isoUtc(nowMs), ghiWm2: r1(clamp(w.ghiWm2, 0, 1600)), dhiWm2: r1(clamp(w.dhiWm2, 0, 1000)), airTempC: r1(w.airTempC), windMs: r1(w.windMs), gustMs: r1(w.gustMs) };
}

export function eventPayload(nowMs: number, e: Omit<UnitEvent, 'v' | 'ts'>): UnitEvent {
  return { v: 1, ts: isoUtc(nowMs), ...e };
}

export function ackPayload(nowMs: number, commandId: string, result: CommandAck['result'], reason?: string): CommandAck {
  return { v: 1, commandId, ts: isoUtc(nowMs), result, ...(reason ? { reason } : {}) };
}
