import { z } from 'zod';
import { COMMAND_KINDS, EVENT_KINDS, UNIT_MODES, WIRE_RANGES as R, WIRE_VERSION } from './wire-format';

/**
 * MQTT payloads of wire format v1: UTF-8 JSON, at most 8 KB each, every one carrying `v: 1`.
 * Timestamps are the unit's own clock as ISO 8601 UTC (`...Z`). Angles in degrees (tilt from horizontal, azimuth clockwise
 * from true north), irradiance in W/m², currents in A, power in W, temperature in °C.
 */
const isoUtc = z.iso.datetime({ offset: false, precision: -1 }).or(z.iso.datetime({ offset: false }));
const finite = (min: number, max: number) => z.number().min(min).max(max);
const wm2 = finite(...R.irradianceWm2);
const v = z.literal(WIRE_VERSION);

/** One report of a unit, every report interval (default 5 s). `seq` counts up per unit and survives reconnects. */
export const telemetrySchema = z.strictObject({
  v,
  seq: z.number().int().min(R.seq[0]).max(R.seq[1]),
  ts: isoUtc,
  tiltPlusWm2: wm2,
  tiltMinusWm2: wm2,
  azimuthPlusWm2: wm2,
  azimuthMinusWm2: wm2,
  poaWm2: wm2,
  tiltDeg: finite(...R.tiltDeg),
  azimuthDeg: finite(...R.azimuthDeg),
  cmdTiltDeg: finite(...R.tiltDeg),
  cmdAzimuthDeg: finite(...R.azimuthDeg),
  tiltMotorA: finite(...R.motorA),
  azimuthMotorA: finite(...R.motorA),
  dcPowerW: finite(...R.dcPowerW),
  moduleTempC: finite(...R.moduleTempC),
  mode: z.enum(UNIT_MODES),
  firmware: z.string().max(32),
});
export type Telemetry = z.infer<typeof telemetrySchema>;

/** Something the unit itself noticed. Scan samples come as `[tiltDeg, azimuthDeg, poaWm2]` triples, in chunks. */
export const eventSchema = z.strictObject({
  v,
  ts: isoUtc,
  kind: z.enum(EVENT_KINDS),
  mode: z.enum(UNIT_MODES).optional(),
  code: z.string().max(64).optional(),
  message: z.string().max(500).optional(),
  commandId: z.string().max(64).optional(),
  samples: z
    .array(z.tuple([finite(...R.tiltDeg), finite(...R.azimuthDeg), wm2]))
    .max(250)
    .optional(),
});
export type UnitEvent = z.infer<typeof eventSchema>;

export const unitConfigSchema = z.strictObject({
  detectorTiltDeg: finite(...R.detectorTiltDeg).optional(),
  gain: finite(...R.gain).optional(),
  deadbandWm2: finite(...R.deadbandWm2).optional(),
  reportIntervalS: finite(...R.reportIntervalS).optional(),
});
export type UnitConfig = z.infer<typeof unitConfigSchema>;

/** Server → unit, QoS 1. */
export const commandSchema = z.strictObject({
  v,
  commandId: z.string().min(1).max(64),
  ts: isoUtc,
  kind: z.enum(COMMAND_KINDS),
  tiltDeg: finite(...R.commandTiltDeg).optional(),
  azimuthDeg: finite(...R.commandAzimuthDeg).optional(),
  config: unitConfigSchema.optional(),
});
export type Command = z.infer<typeof commandSchema>;

/** Unit → server: what became of a command. `accepted` may be followed by `done`; `rejected` ends it. */
export const ackSchema = z.strictObject({
  v,
  commandId: z.string().min(1).max(64),
  ts: isoUtc,
  result: z.enum(['accepted', 'done', 'rejected']),
  reason: z.string().max(200).optional(),
});
export type CommandAck = z.infer<typeof ackSchema>;

/** Retained; the same topic carries the unit's last will `{ v: 1, online: false }`. */
export const statusSchema = z.strictObject({
  v,
  online: z.boolean(),
  ts: isoUtc.optional(),
  firmware: z.string().max(32).optional(),
});
export type UnitStatus = z.infer<typeof statusSchema>;

/** A site weather station, published by the unit that carries it. */
export const weatherSchema = z.strictObject({
  v,
  ts: isoUtc,
  ghiWm2: finite(...R.ghiWm2),
  dhiWm2: finite(...R.dhiWm2).optional(),
  airTempC: finite(...R.airTempC),
  windMs: finite(...R.windMs),
  gustMs: finite(...R.gustMs),
});
export type Weather = z.infer<typeof weatherSchema>;
