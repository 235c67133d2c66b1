/**
 * A scan as the survey fit sees it (shared/survey-fit): its raster samples modelled at the scan's middle instant, with
 * the station's weather over the scan, and the site's other units' settled readings near that instant. A scan reports
 * its raster in rows (one `scan-samples` event as each row ends), so it began about one row before its first report.
 * One epoch per scan: modelling each row at its own instant costs a sky per row and, on the demo's scans, changed
 * nothing the fit found (the fit leaves out scans with the sun near an edge instead). Pure; the server and the offline
 * evaluation build their epochs here.
 */
import type { FitEpoch, FitSample } from '../../shared/survey-fit';
import { rebuildScan, type ScanSample } from './scan-rebuild';
import type { SiteWeather } from './site-sky';

export interface ScanRow {
  /** When the row was reported [ms]. */
  ts: number;
  samples: readonly ScanSample[];
}

export interface ScanSpan {
  fromMs: number;
  toMs: number;
  /** The middle: the instant the scan is modelled at [ms]. */
  atMs: number;
  samples: ScanSample[];
}

export function scanSpan(rows: readonly ScanRow[]): ScanSpan {
  const sorted = [...rows].filter((r) => r.samples.length > 0).sort((a, b) => a.ts - b.ts);
  if (!sorted.length) throw new RangeError('a scan needs at least one row of samples');
  const firstRowMs = sorted.length > 1 ? sorted[1]!.ts - sorted[0]!.ts : 0;
  const fromMs = sorted[0]!.ts - firstRowMs;
  const toMs = sorted[sorted.length - 1]!.ts;
  return { fromMs, toMs, atMs: (fromMs + toMs) / 2, samples: sorted.flatMap((r) => [...r.samples]) };
}

export function scanEpoch(span: ScanSpan, weather: SiteWeather | null, settled: readonly FitSample[]): FitEpoch {
  const max = rebuildScan(span.samples).globalMax;
  return {
    atMs: span.atMs,
    weather,
    samples: [...span.samples.map(([tiltDeg, azimuthDeg, poaWm2]) => ({ tiltDeg, azimuthDeg, poaWm2 })), ...settled],
    measuredMax: { tiltDeg: max.tiltDeg, azimuthDeg: max.azimuthDeg },
  };
}
