import { z } from 'zod';

/**
 * MQTT payloads of wire format v1: UTF-8 JSON, at most 8 KB each, every one carrying `v: 1`.
 * Timestamps are the unit's own clock as ISO 8601 UTC (`...Z`). Angles in degrees (tilt from horizontal, azimuth clockwise
 * from true north), irradiance in W/m², currents in A, power in W, temperature in °C.
 */
export const MAX_PAYLOAD_BYTES = 8 * 1024;

export const UNIT_MODES = ['seeking', 'settled', 'scanning', 'stowed', 'held', 'fault'] as const;
export type UnitMode = (typeof UNIT_MODES)[number];

const isoUtc = z.iso.datetime({ offset: false, precision: -1 }).or(z.iso.datetime({ offset: false }));
const finite = (min: number, max: number) => z.number().min(min).max(max);
const wm2 = finite(-50, 5000);

/** One report of a unit, every report interval (default 5 s). `seq` counts up per unit and survives reconnects. */
export const telemetrySchema = z.strictObject({
  v: z.literal(1),
  seq: z.number().int().min(0).max(2 ** 53 - 1),
  ts: isoUtc,
  tiltPlusWm2: wm2,
  tiltMinusWm2: wm2,
  azimuthPlusWm2: wm2,
  azimuthMinusWm2: wm2,
  poaWm2: wm2,
  tiltDeg: finite(-5, 95),
  azimuthDeg: finite(-360, 720),
  cmdTiltDeg: finite(-5, 95),
  cmdAzimuthDeg: finite(-360, 720),
  tiltMotorA: finite(-50, 50),
  azimuthMotorA: finite(-50, 50),
  dcPowerW: finite(-100, 200_000),
  moduleTempC: finite(-60, 120),
  mode: z.enum(UNIT_MODES),
  firmware: z.string().max(32),
});
export type Telemetry = z.infer<typeof telemetrySchema>;

export const EVENT_KINDS = ['mode-change', 'fault', 'fault-cleared', 'scan-samples', 'scan-complete', 'boot'] as const;
/** Something the unit itself noticed. Scan samples come as `[tiltDeg, azimuthDeg, poaWm2]` triples, in chunks. */
export const eventSchema = z.strictObject({
  v: z.literal(1),
  ts: isoUtc,
  kind: z.enum(EVENT_KINDS),
  mode: z.enum(UNIT_MODES).optional(),
  code: z.string().max(64).optional(),
  message: z.string().max(500).optional(),
  commandId: z.string().max(64).optional(),
  samples: z.array(z.tuple([finite(-5, 95), finite(-360, 720), wm2])).max(250).optional(),
});
export type UnitEvent = z.infer<typeof eventSchema>;

export const COMMAND_KINDS = ['scan', 'goto', 'stow', 'release-stow', 'hold', 'release-hold', 'configure'] as const;
export type CommandKind = (typeof COMMAND_KINDS)[number];
/** Commands that move the structure: refused while a unit is on maintenance hold. */
export const MOTION_COMMANDS: readonly CommandKind[] = ['scan', 'goto', 'stow', 'release-stow'];

export const unitConfigSchema = z.strictObject({
  detectorTiltDeg: finite(0.5, 45).optional(),
  gain: finite(0.001, 100).optional(),
  deadbandWm2: finite(0, 500).optional(),
  reportIntervalS: finite(1, 3600).optional(),
});
export type UnitConfig = z.infer<typeof unitConfigSchema>;

/** Server → unit, QoS 1. */
export const commandSchema = z.strictObject({
  v: z.literal(1),
  commandId: z.string().min(1).max(64),
  ts: isoUtc,
  kind: z.enum(COMMAND_KINDS),
  tiltDeg: finite(0, 90).optional(),
  azimuthDeg: finite(0, 360).optional(),
  config: unitConfigSchema.optional(),
});
export type Command = z.infer<typeof commandSchema>;

/** Unit → server: what became of a command. `accepted` may be followed by `done`; `rejected` ends it. */
export const ackSchema = z.strictObject({
  v: z.literal(1),
  commandId: z.string().min(1).max(64),
  ts: isoUtc,
  result: z.enum(['accepted', 'done', 'rejected']),
  reason: z.string().max(200).optional(),
});
export type CommandAck = z.infer<typeof ackSchema>;

/** Retained; the same topic carries the unit's last will `{ v: 1, online: false }`. */
export const statusSchema = z.strictObject({
  v: z.literal(1),
  online: z.boolean(),
  ts: isoUtc.optional(),
  firmware: z.string().max(32).optional(),
});
export type UnitStatus = z.infer<typeof statusSchema>;

/** A site weather station, published by the unit that carries it. */
export const weatherSchema = z.strictObject({
  v: z.literal(1),
  ts: isoUtc,
  ghiWm2: finite(0, 1600),
  dhiWm2: finite(0, 1000).optional(),
  airTempC: finite(-60, 65),
  windMs: finite(0, 90),
  gustMs: finite(0, 120),
});
export type Weather = z.infer<typeof weatherSchema>;
