/**
 * Health alarms and scan results as the API and the live socket send them (`/api/alarms`, `/api/units/:id/scans/latest`,
 * `/api/sites/:id/health-settings`, `{ type: 'alarm' }` over `/ws`). The server builds these shapes in
 * `server/services/health-service.ts` and `server/health/scan-rebuild.ts`; this file is the copy both sides type against.
 */

/** Alarm kinds the health engine raises (in the order the dashboard lists them); others may appear later and are shown by name. */
export const ALARM_KINDS = ['trap', 'stall', 'drift', 'hunting', 'comms', 'site-comms', 'soiling', 'not-stowed'] as const;
export type AlarmKind = (typeof ALARM_KINDS)[number];

/** P1 most urgent … P4 least. */
export const ALARM_SEVERITIES = ['P1', 'P2', 'P3', 'P4'] as const;
export type AlarmSeverity = (typeof ALARM_SEVERITIES)[number];

export type AlarmState = 'active' | 'cleared';

/** One stored alarm (REST and live). Times are ISO 8601 UTC. */
export interface AlarmView {
  id: number;
  /** One of {@link AlarmKind}; typed loosely so new kinds do not break older dashboards. */
  kind: string;
  /** One of {@link AlarmSeverity}. */
  severity: string;
  /** One of {@link AlarmState}. */
  state: string;
  /** null for a site alarm. */
  unitId: number | null;
  serial: string | null;
  siteId: number;
  siteName?: string;
  /** One sentence: what is wrong, with the numbers. */
  message: string;
  /** What to do about it. */
  advice: string;
  /** Readings and model at the raise, then the latest snapshot while open (shape depends on the kind). */
  evidence: Record<string, unknown>;
  firstSeenAt: string;
  raisedAt: string;
  lastSeenAt: string;
  clearedAt: string | null;
  clearReason: string | null;
  acknowledgedAt: string | null;
  /** Name of the person who acknowledged. */
  acknowledgedBy: string | null;
}

/** A wind stow or its release: an event pushed live on the alarm channel, not an alarm. */
export interface StowEventView {
  kind: 'wind-stow';
  severity: 'P4';
  state: 'event';
  serial: string;
  siteId: number;
  at: string;
  event: 'stowed' | 'released';
  message: string;
}

/** What `{ type: 'alarm' }` carries over `/ws`: an alarm (raised, updated, cleared, acknowledged) or a stow event. */
export type AlarmLiveItem = AlarmView | StowEventView;

/** An orientation with the in-plane irradiance measured or modelled there. */
export interface OrientationPeak {
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
}

/** `GET /api/units/:id/scans/latest`: a scan rebuilt into a landscape and compared with the model. */
export interface ScanResult {
  commandId: string;
  startedAt: string;
  completedAt: string | null;
  /** Whether the unit reported the end of the scan. */
  complete: boolean;
  landscape: {
    tiltsDeg: number[];
    azimuthsDeg: number[];
    /** Row-major [tilt][azimuth] [W/m²]; null where no sample was taken. */
    values: (number | null)[][];
    samples: number;
    sampleMax: OrientationPeak;
    /** Refined estimate of the measured maximum. */
    globalMax: OrientationPeak;
    /** Brightest first. */
    localMaxima: OrientationPeak[];
  };
  /** In-plane irradiance before the scan [W/m²]. */
  beforeWm2: number | null;
  expectedGainWm2: number | null;
  expectedGainPct: number | null;
  model: { globalMax: OrientationPeak; angleApartDeg: number; measuredVsModelPct: number } | null;
  /** The command to offer (sent only after the confirmation). */
  goto: { kind: 'goto'; tiltDeg: number; azimuthDeg: number };
}

/** `POST /api/detectors/run`: a range of at most 48 h and, optionally, the units (default every unit the caller sees). */
export interface DetectorRunRequest {
  from: string;
  to: string;
  unitIds?: number[];
}

/** What the detectors would raise over stored telemetry of the range, beside the alarms stored for it. */
export interface DetectorRunResult {
  from: string;
  to: string;
  units: number;
  /** Telemetry reports read. */
  reports: number;
  /** The run's alarms (negative ids: nothing is stored). */
  alarms: AlarmView[];
  /** Stored alarms of those units (and site-wide alarms of their sites) open at some time in the range, oldest first. */
  stored: AlarmView[];
}

/** The longest reason a health-settings change may carry. */
export const HEALTH_SETTINGS_REASON_MAX = 500;

/**
 * `PUT /api/sites/:id/health-settings`: the site's new overrides (every setting left out takes its default) and why they
 * change (required; written to the audit log with the change).
 */
export type HealthSettingsSave = Record<string, number | string> & { reason: string };

/** One saved change of a site's health settings, read from the audit log. */
export interface HealthSettingsChange {
  at: string;
  /** Who saved it; null when that person no longer exists. */
  by: { id: number; name: string } | null;
  /** Why; null for changes saved before a reason was asked for. */
  reason: string | null;
  /** Each setting whose override changed: `null` means the default (no override). */
  changes: { key: string; from: number | null; to: number | null }[];
}

/** `GET /api/sites/:id/health-settings/history?limit`: newest first, with how many there are in all. */
export interface HealthSettingsHistory {
  siteId: number;
  total: number;
  entries: HealthSettingsChange[];
}

/** `GET|PUT /api/sites/:id/health-settings`. */
export interface SiteHealthSettings {
  defaults: Record<string, number>;
  overrides: Record<string, number>;
  effective: Record<string, number>;
  /** The range each setting may take, in its unit; `integer` for counts. A PUT outside it is refused. */
  ranges: Record<string, { min: number; max: number; unit: string; integer?: boolean }>;
}
