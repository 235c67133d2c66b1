/**
 * Landscape view contracts: a site's modelled irradiance over every panel orientation (tilt × azimuth) at an instant,
 * the blurred landscape a detector pair of a given tilt climbs, its maxima and their basins, and over a day the
 * smallest detector tilt that leaves a single peak. Angles in degrees (azimuth clockwise from north, tilt from
 * horizontal), irradiance in W/m², times ISO 8601 UTC.
 */

export interface LandscapePeak {
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
  prominenceWm2: number;
  /** Share (0…1) of start orientations whose ascent under the chosen detector tilt ends on this peak. */
  basinShare: number;
}

export interface SiteLandscape {
  siteId: number;
  at: string;
  /** The sun above the horizontal plane, or null (night, indoors without daylight). */
  sun: { azimuthDeg: number; elevationDeg: number } | null;
  /** How irradiance magnitudes were set (weather station or clear-sky model), in words. */
  magnitudeSource: string;
  stepDeg: number;
  detectorTiltDeg: number;
  /** Grid, present unless asked for maxima only: values row-major [tiltIndex · azimuths.length + azimuthIndex], 0.1 W/m². */
  grid: { tiltsDeg: number[]; azimuthsDeg: number[]; values: number[]; blurred: number[] } | null;
  globalMax: { tiltDeg: number; azimuthDeg: number; wm2: number };
  localMaxima: LandscapePeak[];
  minSinglePeakDetectorTiltDeg: number | null;
  /** Prominence below which a bump counts as a ripple [W/m²]. */
  minProminenceWm2: number;
}

export interface LandscapeHour {
  at: string;
  sunElevationDeg: number;
  sunAzimuthDeg: number;
  peaks: number;
  globalMaxWm2: number;
  minSinglePeakDetectorTiltDeg: number | null;
}

export interface LandscapeDay {
  siteId: number;
  date: string;
  timeZone: string;
  stepDeg: number;
  /** Every daylight hour of the local day (sun above the horizontal plane). */
  hours: LandscapeHour[];
  /** The largest of the hourly values: the detector tilt that keeps every hour single-peaked (null if some hour has none). */
  recommendedDetectorTiltDeg: number | null;
  /** Sun positions every 15 minutes while up, for sky-dome drawings. */
  sunPath: { at: string; azimuthDeg: number; elevationDeg: number }[];
}
