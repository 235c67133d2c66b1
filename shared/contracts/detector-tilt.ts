/**
 * The detector tilt a site needs, and sending it to every unit of the site: `GET /api/sites/:id/detector-tilt`
 * (the recommendation) and `POST /api/sites/:id/detector-tilt` (one audited `configure` command per unit). Angles in
 * degrees, times ISO 8601 UTC, dates `YYYY-MM-DD` in the site's calendar.
 */
import type { CommandStatus } from './live';

/** One candidate day of the year and the single-peak detector tilt it needs. */
export interface DetectorTiltDay {
  date: string;
  /** Daylight instants judged. */
  instants: number;
  /** Daylight instants left out: the modelled best below the site's trap threshold (traps are not judged then). */
  instantsTooDim: number;
  /** The largest single-peak detector tilt over the day [°]; null when no instant has one (or the day is dark). */
  singlePeakDetectorTiltDeg: number | null;
  /** Instants where no detector tilt up to `maxDetectorTiltDeg` leaves a single peak. */
  instantsWithoutSinglePeak: number;
  /** The most maxima the raw landscape had at any instant of the day. */
  maxPeaks: number;
}

export interface DetectorTiltRecommendation {
  siteId: number;
  year: number;
  marginDeg: number;
  /** Instants are judged only when the modelled best reaches this [W/m²] (the site's health setting for traps). */
  minBestWm2: number;
  /** The steepest detector tilt the search tried (what units take) [°]. */
  maxDetectorTiltDeg: number;
  /** How the year was judged, in words (which days, how often, which model). */
  basis: string;
  /** The candidate days (coarse pass), in date order. */
  days: DetectorTiltDay[];
  /** The worst day, judged again more finely; null when the site has no daylight on any candidate day. */
  worstDay: (DetectorTiltDay & { worstAt: string | null; stepDeg: number }) | null;
  /** Worst day + margin on the 0.5° grid; null when no detector tilt makes the worst day single-peaked (plan scans). */
  recommendedDetectorTiltDeg: number | null;
  /** Whether the margin was cut to stay within what units accept (45°). */
  capped: boolean;
  /** The site's units with the detector tilt their setup records. */
  units: { id: number; serial: string; detectorTiltDeg: number; disabled: boolean }[];
}

/** `POST /api/sites/:id/detector-tilt`: the tilt to send to every enabled unit of the site; `confirm` must be true. */
export interface ApplyDetectorTiltRequest {
  detectorTiltDeg: number;
  confirm: true;
}

/** What happened per unit: the command sent (and its state when the answer was written), or why it was refused. */
export interface ApplyDetectorTiltUnit {
  unitId: number;
  serial: string;
  commandId: string | null;
  /** `skipped`: a disabled unit, sent nothing; `refused`: the command service said no (the reason says why). */
  status: CommandStatus | 'refused' | 'skipped';
  reason: string | null;
}

export interface ApplyDetectorTiltResult {
  siteId: number;
  detectorTiltDeg: number;
  units: ApplyDetectorTiltUnit[];
}
