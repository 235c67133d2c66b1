import type { Telemetry } from './wire';

/**
 * The simulator's history stream (simulator/history-cli.ts → server/scripts/simulator-history.ts): one JSON object per
 * line. Telemetry, most of the full-rate stream, travels as a row in `TELEMETRY_ROW_FIELDS` order; other messages as
 * their wire payload; rollup-level quarters as a row.
 */
export const TELEMETRY_ROW_FIELDS = [
  'seq',
  'ts',
  'tiltPlusWm2',
  'tiltMinusWm2',
  'azimuthPlusWm2',
  'azimuthMinusWm2',
  'poaWm2',
  'tiltDeg',
  'azimuthDeg',
  'cmdTiltDeg',
  'cmdAzimuthDeg',
  'tiltMotorA',
  'azimuthMotorA',
  'dcPowerW',
  'moduleTempC',
  'mode',
  'firmware',
] as const satisfies readonly Exclude<keyof Telemetry, 'v'>[];

/**
 * The fields of a rollup-level quarter row: the unit, the bucket start [ms], the rollup's measured columns, then what the
 * statements read (module temperature [°C], mean orientation [°], minutes per mode, the four modelled in-plane
 * irradiances [W/m²]: at the unit's orientation, at its best reachable one, on the fixed-tilt and sun-following twins).
 */
export const QUARTER_ROW_FIELDS = [
  'serial',
  'bucketMs',
  'minutes',
  'samples',
  'poaAvgWm2',
  'poaMaxWm2',
  'dcPowerAvgW',
  'energyWh',
  'moduleTempC',
  'tiltDeg',
  'azimuthDeg',
  'seekingMin',
  'settledMin',
  'stowedMin',
  'modelUnitWm2',
  'modelBestWm2',
  'modelFixedWm2',
  'modelSunWm2',
] as const;

type QuarterField = (typeof QUARTER_ROW_FIELDS)[number];

/** A quarter row of the stream: the serial first, numbers after it. */
export type QuarterRowFields = {
  -readonly [K in keyof typeof QUARTER_ROW_FIELDS]: (typeof QUARTER_ROW_FIELDS)[K] extends 'serial' ? string : number;
};

/** A quarter of the stream with its fields named. */
export type HistoryQuarter = { serial: string } & Record<Exclude<QuarterField, 'serial'>, number>;

/** A quarter row of the stream as named fields. */
export function quarterOfRow(r: QuarterRowFields): HistoryQuarter {
  const q: Record<string, unknown> = {};
  QUARTER_ROW_FIELDS.forEach((f, i) => (q[f] = r[i]));
  return q as HistoryQuarter;
}

export type HistoryLine =
  /** A report a unit sent (full rate), its fields in TELEMETRY_ROW_FIELDS order; `sentMs`: when it left the unit. */
  | { k: 't'; serial: string; sentMs: number; r: unknown[] }
  /** Another message a unit sent (events, weather). */
  | { k: 'm'; serial: string; leaf: 'events' | 'weather'; payload: unknown; sentMs: number }
  | {
      k: 'q';
      /** A unit's 15-minute interval at the rollup level, fields in `QUARTER_ROW_FIELDS` order. */
      r: QuarterRowFields;
    }
  /** A weather station reading at the rollup level (`serial`: the unit that carries the station). */
  | { k: 'w'; serial: string; tsMs: number; ghiWm2: number; dhiWm2: number; airTempC: number; windMs: number; gustMs: number }
  | { k: 'truth'; serial: string; fault: string; start: string; end: string | null }
  | { k: 'end'; messages: number; quarters: number; seconds: number };

/** A telemetry row of the stream as the wire payload it stands for. */
export function telemetryOfRow(r: readonly unknown[]): Telemetry {
  const t: Record<string, unknown> = { v: 1 };
  TELEMETRY_ROW_FIELDS.forEach((f, i) => (t[f] = r[i]));
  return t as unknown as Telemetry;
}
