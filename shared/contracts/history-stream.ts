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

export type HistoryLine =
  /** A report a unit sent (full rate), its fields in TELEMETRY_ROW_FIELDS order; `sentMs`: when it left the unit. */
  | { k: 't'; serial: string; sentMs: number; r: unknown[] }
  /** Another message a unit sent (events, weather). */
  | { k: 'm'; serial: string; leaf: 'events' | 'weather'; payload: unknown; sentMs: number }
  | {
      k: 'q';
      /** serial, bucket start [ms], minutes, samples, poaAvgWm2, poaMaxWm2, dcPowerAvgW, energyWh */
      r: [string, number, number, number, number, number, number, number];
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
