/**
 * What the detectors need to know about a site's modelled sky at an instant. The server builds it from the site's survey
 * and weather through the landscape engine (cached per site for a few minutes); the evaluation builds it from the
 * simulator's own sky. Detectors never call the engine themselves, so they stay synchronous and testable.
 */
export interface ModelPeak {
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
}

export interface ModelReadings {
  panelWm2: number;
  tiltPlusWm2: number;
  tiltMinusWm2: number;
  azimuthPlusWm2: number;
  azimuthMinusWm2: number;
}

export interface SiteModel {
  /** Instant the model describes [ms]. */
  atMs: number;
  /** Sun elevation [°] (−90 when there is no sun, e.g. indoors at night). */
  sunElevationDeg: number;
  indoor: boolean;
  /** Brightest reachable orientation. */
  globalMax: ModelPeak;
  /** Prominent local maxima, when the analysis was run. */
  localMaxima?: readonly (ModelPeak & { basinShare?: number })[];
  /** Smallest detector tilt whose blurred landscape has a single peak [°]; undefined when not computed, null when none. */
  minSinglePeakDetectorTiltDeg?: number | null;
  /** Modelled panel and detector readings at an orientation, for a detector tilt δ. */
  readings(tiltDeg: number, azimuthDeg: number, detectorTiltDeg: number): ModelReadings;
  /** Fuller analysis (local maxima, single-peak tilt), computed on demand for evidence; may be slow. */
  analyse?(): Pick<SiteModel, 'localMaxima' | 'minSinglePeakDetectorTiltDeg'>;
}

/** Returns the model of a site near an instant, or undefined when none is available (detectors then hold their state). */
export interface SiteModelProvider {
  siteModel(siteId: number, atMs: number): SiteModel | undefined;
}
