/**
 * Trace explorer contracts: one unit's telemetry over a time range, reduced on the server to a fixed number of
 * buckets with the minimum and maximum of every quantity in each bucket (so spikes survive downsampling).
 * Times are epoch milliseconds (UTC) in the arrays, ISO 8601 UTC elsewhere.
 */

/** Quantities of a trace, with their unit in the key. */
export const TRACE_QUANTITIES = [
  'tiltPlusWm2',
  'tiltMinusWm2',
  'azimuthPlusWm2',
  'azimuthMinusWm2',
  'tiltDiffWm2',
  'azimuthDiffWm2',
  'tiltDeg',
  'cmdTiltDeg',
  'azimuthDeg',
  'cmdAzimuthDeg',
  'poaWm2',
  'dcPowerW',
] as const;
export type TraceQuantity = (typeof TRACE_QUANTITIES)[number];

export interface TraceQuantityInfo {
  label: string;
  unit: string;
  /** Column name in the CSV export. */
  csv: string;
  /** For a photodifferential: the reported quantities it is the difference of (plus − minus); others are reported as they are. */
  difference?: readonly [TraceQuantity, TraceQuantity];
}

/** The one table of trace quantities: label, unit, CSV column name and how each is derived from a report. */
export const TRACE_QUANTITY_INFO: Record<TraceQuantity, TraceQuantityInfo> = {
  tiltPlusWm2: { label: 'Tilt detector +', unit: 'W/m²', csv: 'tilt_plus_detector_W_m2' },
  tiltMinusWm2: { label: 'Tilt detector −', unit: 'W/m²', csv: 'tilt_minus_detector_W_m2' },
  azimuthPlusWm2: { label: 'Azimuth detector +', unit: 'W/m²', csv: 'azimuth_plus_detector_W_m2' },
  azimuthMinusWm2: { label: 'Azimuth detector −', unit: 'W/m²', csv: 'azimuth_minus_detector_W_m2' },
  tiltDiffWm2: {
    label: 'Tilt photodifferential',
    unit: 'W/m²',
    csv: 'tilt_differential_W_m2',
    difference: ['tiltPlusWm2', 'tiltMinusWm2'],
  },
  azimuthDiffWm2: {
    label: 'Azimuth photodifferential',
    unit: 'W/m²',
    csv: 'azimuth_differential_W_m2',
    difference: ['azimuthPlusWm2', 'azimuthMinusWm2'],
  },
  tiltDeg: { label: 'Measured tilt', unit: '°', csv: 'tracker_tilt_deg' },
  cmdTiltDeg: { label: 'Commanded tilt', unit: '°', csv: 'commanded_tilt_deg' },
  azimuthDeg: { label: 'Measured azimuth', unit: '°', csv: 'tracker_azimuth_deg' },
  cmdAzimuthDeg: { label: 'Commanded azimuth', unit: '°', csv: 'commanded_azimuth_deg' },
  poaWm2: { label: 'In-plane irradiance', unit: 'W/m²', csv: 'poa_irradiance_W_m2' },
  dcPowerW: { label: 'DC power', unit: 'W', csv: 'dc_power_W' },
};

export interface TraceSeries {
  /** Smallest value in each bucket; null where the bucket has no data. */
  min: (number | null)[];
  max: (number | null)[];
}

/** Something the unit reported (mode change, fault, scan) or an alarm, drawn over the traces. */
export interface TraceMark {
  at: string;
  kind: string;
  text: string;
}

export interface UnitTraces {
  unitId: number;
  serial: string;
  from: string;
  to: string;
  /** Width of one bucket [ms]. Bucket i covers [fromMs + i·bucketMs, fromMs + (i+1)·bucketMs). */
  bucketMs: number;
  /** Start of every bucket that holds data [epoch ms]; buckets without data are left out. */
  t: number[];
  /** Samples in each bucket. */
  samples: number[];
  series: Record<TraceQuantity, TraceSeries>;
  /** Raw rows read. */
  rows: number;
  /** Where the values came from: raw reports; the 1-minute rollup with per-minute extremes when buckets are whole minutes;
   * or both, when the newest minutes are not rolled up yet. */
  source: 'raw' | 'rollup' | 'rollup+raw';
  events: TraceMark[];
  /** null when alarms cannot be read (the alarm service is not there). */
  alarms: TraceMark[] | null;
  /** The modelled best in-plane irradiance (global maximum of the site's landscape) at a few instants. */
  modelledBest: { t: number[]; wm2: number[] };
}

/** Largest range a raw CSV export may span [days]. */
export const MAX_CSV_DAYS = 7;
