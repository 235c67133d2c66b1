/**
 * A unit's scan: a serpentine raster of orientations, one reference-cell sample at each after a short dwell, sent in
 * rows; at the end the unit goes to the brightest sample and climbs from there.
 */
import type { AxisSpec } from './actuator';

/** Scan raster: rows of tilt [°], azimuth every `SCAN_AZ_STEP_DEG` across the azimuth travel. */
export const SCAN_TILTS_DEG = [10, 30, 50, 70];
export const SCAN_AZ_STEP_DEG = 30;
/** Dwell at each waypoint before sampling [s]. */
export const SCAN_DWELL_S = 1;
/** Longest row of samples in one event. */
export const SCAN_MAX_ROW = 250;

/** One sample: [tiltDeg, azimuthDeg, poaWm2]. */
export type ScanSample = [number, number, number];

export interface ScanState {
  commandId: string;
  waypoints: [number, number][];
  index: number;
  dwellS: number;
  row: ScanSample[];
  all: ScanSample[];
}

/** The raster within the unit's travel, serpentine (every other row runs backward). */
export function scanWaypoints(tiltSpec: AxisSpec, azimuthSpec: AxisSpec): [number, number][] {
  const w: [number, number][] = [];
  const azs: number[] = [];
  for (let a = azimuthSpec.minDeg; a <= azimuthSpec.maxDeg + 1e-9; a += SCAN_AZ_STEP_DEG) azs.push(a);
  SCAN_TILTS_DEG.filter((t) => t >= tiltSpec.minDeg && t <= tiltSpec.maxDeg).forEach((t, row) => {
    const order = row % 2 === 0 ? azs : [...azs].reverse();
    for (const a of order) w.push([t, a]);
  });
  return w;
}

export function newScan(commandId: string, tiltSpec: AxisSpec, azimuthSpec: AxisSpec): ScanState {
  return { commandId, waypoints: scanWaypoints(tiltSpec, azimuthSpec), index: 0, dwellS: 0, row: [], all: [] };
}

/**
 * Records the sample at the current waypoint. Returns the finished row (to send) if this sample ends one, and the
 * brightest sample once the raster is done (else the next waypoint).
 */
export function takeScanSample(
  s: ScanState,
  sample: ScanSample,
): { row: ScanSample[] | null; best: ScanSample | null; next: [number, number] | null } {
  s.row.push(sample);
  s.all.push(sample);
  s.index++;
  s.dwellS = 0;
  let row: ScanSample[] | null = null;
  if (s.index === s.waypoints.length || s.waypoints[s.index]![0] !== sample[0] || s.row.length >= SCAN_MAX_ROW) {
    row = s.row;
    s.row = [];
  }
  if (s.index === s.waypoints.length) return { row, best: s.all.reduce((b, x) => (x[2] > b[2] ? x : b), s.all[0]!), next: null };
  return { row, best: null, next: s.waypoints[s.index]! };
}
