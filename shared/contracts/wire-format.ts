/**
 * The vocabulary of wire format v1 without its zod schemas (those are in `wire.ts`), so the dashboard can import it
 * without pulling zod into the browser: version, payload limit, serial pattern, unit modes, event and command kinds,
 * and the value range of every payload field. Units are in the names (W/m², degrees, A, W, °C, m/s, s).
 */

/** The `v` every MQTT payload carries, and the `v1` in every topic. */
export const WIRE_VERSION = 1;

export const MAX_PAYLOAD_BYTES = 8 * 1024;

/** A unit's serial without anchors (for building larger patterns such as topics): capital letters, digits and dashes, 3–32 characters, not starting with a dash. */
export const SERIAL_PATTERN_SOURCE = '[A-Z0-9][A-Z0-9-]{2,31}';
/** A whole serial number. */
export const SERIAL_PATTERN = new RegExp(`^${SERIAL_PATTERN_SOURCE}$`);

export const UNIT_MODES = ['seeking', 'settled', 'scanning', 'stowed', 'held', 'fault'] as const;
export type UnitMode = (typeof UNIT_MODES)[number];

export const EVENT_KINDS = ['mode-change', 'fault', 'fault-cleared', 'scan-samples', 'scan-complete', 'boot'] as const;

export const COMMAND_KINDS = ['scan', 'goto', 'stow', 'release-stow', 'hold', 'release-hold', 'configure'] as const;
export type CommandKind = (typeof COMMAND_KINDS)[number];
/** Commands that move the structure: refused while a unit is on maintenance hold. */
export const MOTION_COMMANDS: readonly CommandKind[] = ['scan', 'goto', 'stow', 'release-stow'];
/** Commands that place or release a maintenance hold. */
export const HOLD_COMMANDS: readonly CommandKind[] = ['hold', 'release-hold'];

/**
 * The inclusive [min, max] each payload field may take; the schemas refuse anything outside, and a unit clamps its
 * readings to them before sending.
 */
export const WIRE_RANGES = {
  seq: [0, 2 ** 53 - 1],
  /** Detector and in-plane irradiance of a report [W/m²]. */
  irradianceWm2: [-50, 5000],
  /** Measured and commanded tilt of a report [°]. */
  tiltDeg: [-5, 95],
  /** Measured and commanded azimuth of a report (encoder angle, may leave 0…360) [°]. */
  azimuthDeg: [-360, 720],
  motorA: [-50, 50],
  dcPowerW: [-100, 200_000],
  moduleTempC: [-60, 120],
  /** Target tilt of a `goto` command [°]. */
  commandTiltDeg: [0, 90],
  /** Target azimuth of a `goto` command [°]. */
  commandAzimuthDeg: [0, 360],
  /** Settings a `configure` command may carry. */
  detectorTiltDeg: [0.5, 45],
  gain: [0.001, 100],
  deadbandWm2: [0, 500],
  reportIntervalS: [1, 3600],
  /** Weather station readings. */
  ghiWm2: [0, 1600],
  dhiWm2: [0, 1000],
  airTempC: [-60, 65],
  windMs: [0, 90],
  gustMs: [0, 120],
} as const satisfies Record<string, readonly [number, number]>;
