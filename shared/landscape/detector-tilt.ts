/**
 * The detector tilt a site needs. A detector pair tilted ±δ from the panel normal climbs the landscape blurred over a
 * cap of radius δ (blurred-landscape.ts), so a δ whose blurred landscape has a single peak leads every unit to the
 * global maximum from anywhere. `analyseLandscape` finds the smallest such δ for one sky; here that search runs over
 * every instant of a day (the day needs the largest of them), then over candidate days of a year (the year needs its
 * worst day), and the recommendation adds a margin for what the model does not know (survey error, the 0.5° search
 * grid, the grid step of the landscape).
 *
 * Angles in degrees; instants in epoch milliseconds; dates `YYYY-MM-DD` in the site's calendar (labels only).
 */
import { WIRE_RANGES } from '../contracts/wire-format';
import type { Sky } from '../sky-radiance/sky';
import { analyseLandscape, computeLandscape } from './index';

/** Margin added to the worst day's single-peak detector tilt [°] (covers the search's 0.5° grid and survey error). */
export const DETECTOR_TILT_MARGIN_DEG = 2;
/** Detector tilts are sent to units on a 0.5° grid (the single-peak search's own grid). */
const GRID_DEG = 0.5;

export interface DaySkies {
  date: string;
  /** The skies of the day's instants to judge (a day without any, or with all too dim, is dark). */
  instants: { atMs: number; sky: Sky }[];
}

export interface DayDetectorTiltOptions {
  /** Landscape grid step [°], 1…10; default 3 (coarser steps are faster and may miss narrow peaks). */
  stepDeg?: number;
  /** Largest δ the single-peak search tries [°], 0.5…45; default 30. */
  maxDetectorTiltDeg?: number;
  /** Reachable tilt range [°], default [0, 90]. */
  tiltRangeDeg?: readonly [number, number];
  /** Reachable azimuth range [°], default the full circle. */
  azimuthRangeDeg?: readonly [number, number];
  /**
   * Instants whose modelled best (the landscape's maximum) is below this [W/m²] are not judged; default 0. Traps are
   * only judged in enough light (the health setting `trapMinBestWm2`), and at dawn a bump of a few W/m² counts as a
   * peak that no detector tilt removes, though no unit loses anything worth a visit on it.
   */
  minBestWm2?: number;
}

export interface DayDetectorTilt {
  date: string;
  /** Instants judged. */
  instants: number;
  /** Instants left out because their modelled best was below `minBestWm2`. */
  instantsTooDim: number;
  /** The largest single-peak detector tilt over the instants that have one [°]; null when none has (or none was judged). */
  singlePeakDetectorTiltDeg: number | null;
  /** The instant that needed it. */
  worstAtMs: number | null;
  /** Instants where no δ up to the search's maximum leaves a single peak. */
  instantsWithoutSinglePeak: number;
  /** The most prominent maxima of the raw landscape at any instant of the day. */
  maxPeaks: number;
}

/** The single-peak detector tilt of each instant of a day, and the day's largest. */
export function dayDetectorTilt(day: DaySkies, options: DayDetectorTiltOptions = {}): DayDetectorTilt {
  const stepDeg = options.stepDeg ?? 3;
  const maxDetectorTiltDeg = options.maxDetectorTiltDeg ?? 30;
  let worst: number | null = null;
  let worstAtMs: number | null = null;
  let without = 0;
  let maxPeaks = 0;
  let judged = 0;
  let tooDim = 0;
  const range = {
    ...(options.tiltRangeDeg ? { tiltRangeDeg: options.tiltRangeDeg } : {}),
    ...(options.azimuthRangeDeg ? { azimuthRangeDeg: options.azimuthRangeDeg } : {}),
  };
  for (const { atMs, sky } of day.instants) {
    if (options.minBestWm2 && options.minBestWm2 > 0) {
      const raw = computeLandscape(sky, { stepDeg, ...range });
      let best = 0;
      for (const v of raw.values) if (v > best) best = v;
      if (best < options.minBestWm2) {
        tooDim++;
        continue;
      }
    }
    judged++;
    const r = analyseLandscape(sky, { stepDeg, maxDetectorTiltDeg, ...range });
    maxPeaks = Math.max(maxPeaks, r.localMaxima.length);
    if (r.minSinglePeakDetectorTiltDeg === null) without++;
    else if (worst === null || r.minSinglePeakDetectorTiltDeg > worst) {
      worst = r.minSinglePeakDetectorTiltDeg;
      worstAtMs = atMs;
    }
  }
  return {
    date: day.date,
    instants: judged,
    instantsTooDim: tooDim,
    singlePeakDetectorTiltDeg: worst,
    worstAtMs,
    instantsWithoutSinglePeak: without,
    maxPeaks,
  };
}

/**
 * One day's result from results over parts of it (the same day judged a few instants at a time, so a caller can give
 * other work a turn in between): the largest tilt, at its instant (the earliest of equals), counts added up.
 */
export function mergeDayDetectorTilts(date: string, parts: readonly DayDetectorTilt[]): DayDetectorTilt {
  let out: DayDetectorTilt = {
    date,
    instants: 0,
    instantsTooDim: 0,
    singlePeakDetectorTiltDeg: null,
    worstAtMs: null,
    instantsWithoutSinglePeak: 0,
    maxPeaks: 0,
  };
  for (const p of parts) {
    const larger =
      p.singlePeakDetectorTiltDeg !== null &&
      (out.singlePeakDetectorTiltDeg === null || p.singlePeakDetectorTiltDeg > out.singlePeakDetectorTiltDeg);
    out = {
      date,
      instants: out.instants + p.instants,
      instantsTooDim: out.instantsTooDim + p.instantsTooDim,
      singlePeakDetectorTiltDeg: larger ? p.singlePeakDetectorTiltDeg : out.singlePeakDetectorTiltDeg,
      worstAtMs: larger ? p.worstAtMs : out.worstAtMs,
      instantsWithoutSinglePeak: out.instantsWithoutSinglePeak + p.instantsWithoutSinglePeak,
      maxPeaks: Math.max(out.maxPeaks, p.maxPeaks),
    };
  }
  return out;
}

/** How hard a day is: instants without any single-peak tilt first, then the largest tilt; a dark day asks nothing. */
function severity(d: DayDetectorTilt): [number, number] {
  return [d.instantsWithoutSinglePeak, d.singlePeakDetectorTiltDeg ?? (d.instants ? 0 : -1)];
}

/** The worst of the days (the earliest of equals); undefined for no days. */
export function worstDay(days: readonly DayDetectorTilt[]): DayDetectorTilt | undefined {
  let worst: DayDetectorTilt | undefined;
  for (const d of days) {
    if (!worst) {
      worst = d;
      continue;
    }
    const [a1, a2] = severity(d);
    const [b1, b2] = severity(worst);
    if (a1 > b1 || (a1 === b1 && a2 > b2)) worst = d;
  }
  return worst;
}

export interface DetectorTiltRecommendation {
  /** The detector tilt to send [°] on the 0.5° grid within what units accept; null when no δ makes the worst day single-peaked. */
  detectorTiltDeg: number | null;
  /** Whether the margin had to be cut to stay within what units accept (WIRE_RANGES.detectorTiltDeg). */
  capped: boolean;
}

/**
 * The worst day's single-peak detector tilt plus a margin, rounded up to the 0.5° grid and kept within what units
 * accept. A dark worst day (no instant judged) needs nothing beyond the smallest tilt; a worst day with an instant that
 * no tilt makes single-peaked gets null: no detector tilt helps then, and periodic scans must find the global maximum.
 */
export function recommendDetectorTilt(
  worst: DayDetectorTilt | undefined,
  marginDeg = DETECTOR_TILT_MARGIN_DEG,
): DetectorTiltRecommendation {
  if (!Number.isFinite(marginDeg) || marginDeg < 0 || marginDeg > 10)
    throw new RangeError(`marginDeg: must be a finite number in [0, 10]; got ${marginDeg}`);
  const [min, max] = WIRE_RANGES.detectorTiltDeg;
  if (!worst || worst.instantsWithoutSinglePeak > 0) return { detectorTiltDeg: null, capped: false };
  const base = worst.singlePeakDetectorTiltDeg ?? min;
  const wanted = Math.ceil((base + marginDeg) / GRID_DEG - 1e-9) * GRID_DEG;
  return { detectorTiltDeg: Math.min(max, Math.max(min, wanted)), capped: wanted > max };
}
