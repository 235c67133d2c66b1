/**
 * Survey revisions (`/api/sites/:id/survey-revisions`): corrections to a site's survey estimated from its units' scans
 * and settled readings (shared/survey-fit), proposed to an engineer, who accepts or rejects them with a reason. An
 * accepted revision becomes the site's survey (and albedo); nothing is applied without that decision. Angles in degrees,
 * irradiance in W/m², reflectance and albedo as fractions.
 */
import type { SiteSurvey } from './survey';

export const SURVEY_REVISION_STATES = ['proposed', 'accepted', 'rejected', 'superseded'] as const;
export type SurveyRevisionState = (typeof SURVEY_REVISION_STATES)[number];

/** One corrected quantity: the surveyed value, the proposed one ± one standard error, and the bounds of the fit. */
export interface SurveyRevisionParameter {
  key: string;
  /** `stationScale` is a factor on the weather station's readings: reported, never applied (the station wants checking). */
  kind: 'albedo' | 'reflectance' | 'facadeAzimuth' | 'horizonSector' | 'stationScale';
  label: string;
  unit: '' | '°';
  before: number;
  after: number;
  /** One standard error of `after`; null when the value ended at a bound, the scans do not see it, or it was not confirmed. */
  uncertainty: number | null;
  bounds: [number, number];
  /** `not-confirmed`: fitted, but the held-out scans fit better without it, so it stays as surveyed. */
  status: 'fitted' | 'at-bound' | 'not-observable' | 'not-confirmed';
}

export interface SurveyModelError {
  /** Mean |measured − modelled| in-plane irradiance over the units' samples [W/m²]. */
  meanAbsWm2: number;
  /** Mean angle between each scan's measured brightest orientation and the model's [°]; null without scans. */
  globalMaxErrorDeg: number | null;
}

export interface SurveyRevision {
  id: number;
  siteId: number;
  /** 1, 2, … per site. */
  version: number;
  state: SurveyRevisionState;
  proposedAt: string;
  proposedBy: { id: number; name: string } | null;
  decidedAt: string | null;
  decidedBy: { id: number; name: string } | null;
  reason: string | null;
  parameters: SurveyRevisionParameter[];
  /** `after`: the revised survey with the station as it reads (what accepting gives); `afterStationScaled`: with the fitted station scale too. */
  modelError: { before: SurveyModelError; after: SurveyModelError; afterStationScaled: SurveyModelError };
  /** The same on the scans held out of the fit (every fourth); null with fewer than four scans. */
  checkError: { scans: number; before: SurveyModelError; after: SurveyModelError; afterStationScaled: SurveyModelError } | null;
  fit: {
    /** Scans used (each with the settled readings of the site's other units at the time), held-out ones included. */
    scans: number;
    /** Scans left out: the sun within 1.5° of a horizon or facade edge. */
    scansLeftOut: number;
    samples: number;
    iterations: number;
    converged: boolean;
    /** Weighted residual variance at the solution (≈ 1 when the assumed measurement error describes the misfit). */
    residualVariance: number | null;
    /** The scans fitted: unit, scan command, instant. */
    sources: { unitId: number; commandId: string; at: string }[];
  };
  baseSurvey: SiteSurvey;
  baseAlbedo: number;
  proposedSurvey: SiteSurvey;
  proposedAlbedo: number;
  /** What accepting did: locked statements marked "restatement suggested", open trap alarms re-evaluated. */
  outcome: { trapAlarmsReassessed: number; trapAlarmsCleared: number } | null;
}

export interface ProposeSurveyRevisionRequest {
  /** How far back scans are taken [days], 1…90; default 30. */
  days?: number;
}

export interface DecideSurveyRevisionRequest {
  reason: string;
}
