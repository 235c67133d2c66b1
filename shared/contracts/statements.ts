/**
 * Owners' monthly statements as the API sends them (`GET /api/sites/:id/statements/:yyyy-mm`). Energy is DC as the
 * units measure it; yields and PR follow IEC 61724-1; availability is time- and energy-based, raw and contractual, over
 * daylight only; losses are against the modelled best reachable orientation; gains compare with modelled fixed-tilt
 * and sun-following twins under the same measured weather. Ratios are fractions (0.8 = 80 %); null = not computable.
 */
import type { AvailabilityCategory } from './tickets';

export interface StatementMonthSummary {
  month: string;
  /** Whether the month is still running (its figures are "so far"). */
  partial: boolean;
  /** Whether the month is locked (its statement is stored and served as it was locked). */
  locked: boolean;
  /** The version served (1 = as first locked, higher = a restatement); null while unlocked. */
  version: number | null;
  restatementSuggested: boolean;
}

/** `GET /api/sites/:id/statements`. */
export interface StatementMonthList {
  siteId: number;
  siteName: string;
  timeZone: string;
  months: StatementMonthSummary[];
}

export interface StatementAvailability {
  timeRaw: number | null;
  timeContractual: number | null;
  energyRaw: number | null;
  energyContractual: number | null;
  /** Daylight time counted [h]. */
  daylightH: number;
  downH: number;
  excludedH: number;
  lostKwh: number;
  excludedLostKwh: number;
}

/** Losses against the modelled best reachable orientation [kWh]; the parts add up to modelled − measured. */
export interface StatementLosses {
  modelledBestKwh: number;
  /** Measured energy over the modelled buckets (the reconciliation's measured side) [kWh]. */
  measuredKwh: number;
  trappedKwh: number;
  downtimeKwh: number;
  heldKwh: number;
  stowedKwh: number;
  soilingKwh: number;
  residualKwh: number;
}

export interface StatementGains {
  /** Measured energy over the modelled buckets [kWh]. */
  measuredKwh: number;
  fixedTwinKwh: number;
  sunTwinKwh: number;
  /** (measured ÷ twin − 1) × 100 [%]. */
  gainOverFixedPct: number | null;
  gainOverSunPct: number | null;
}

export interface StatementFigures {
  /** DC energy as measured by the units [kWh]. */
  energyKwh: number;
  p0Kwp: number;
  /** Final yield Yf = E / P0 [kWh/kWp]. */
  yfH: number | null;
  /** In-plane irradiation measured by the units (capacity-weighted for a site) [kWh/m²]. */
  hiKwhM2: number;
  /** Reference yield Yr = Hi / 1 kW/m² [h]. */
  yrH: number;
  pr: number | null;
  /** Temperature-corrected PR with the stated γ. */
  prStc: number | null;
  /** Share of expected minutes with reports. */
  completeness: number;
  /** Share of daylight buckets with modelled values (losses and gains cover these). */
  modelledShare: number;
  availability: StatementAvailability;
  losses: StatementLosses;
  gains: StatementGains;
}

export interface StatementUnit extends StatementFigures {
  unitId: number;
  serial: string;
}

export interface StatementDay {
  date: string;
  /** Local length of the day [h] (23 or 25 on a daylight-saving change). */
  hours: number;
  energyKwh: number;
  hiKwhM2: number;
  yfH: number | null;
  pr: number | null;
  completeness: number;
  availabilityTimeRaw: number | null;
  gainOverFixedPct: number | null;
  gainOverSunPct: number | null;
}

export type ExclusionSource = 'ticket' | 'wind-stow' | 'hold' | 'comms' | 'stall' | 'fault';

/** An interval of downtime with its IEC TS 63019 category and where the category came from. */
export interface StatementExclusion {
  serial: string;
  from: string;
  to: string;
  minutes: number;
  category: AvailabilityCategory;
  source: ExclusionSource;
  ticketId: number | null;
  /** Whether contractual availability excuses it. */
  excused: boolean;
  lostKwh: number;
}

export interface StatementTickets {
  opened: number;
  closed: number;
  resolved: number;
  slaCompliancePct: number | null;
  mttrH: number | null;
}

/** One stored version of a locked month. */
export interface StatementVersionSummary {
  version: number;
  /** `locked` = the version in force; `superseded` = replaced by a restatement (still readable). */
  state: 'locked' | 'superseded';
  lockedAt: string;
  /** Who locked or restated it; null = the automatic lock. */
  lockedBy: string | null;
  /** Why it was restated (null for the first version). */
  reason: string | null;
  /** SHA-256 (hex) of the canonical JSON of the content (every field but `lock`, object keys sorted). */
  checksum: string;
}

/** How a served statement stands: null while the month is open (computed on each request). */
export interface StatementLockInfo extends StatementVersionSummary {
  /** When data for this month arrived after it was locked (engineers and admins may restate it). */
  restatementSuggestedAt: string | null;
  /** Every version of the month, newest first. */
  versions: StatementVersionSummary[];
}

export interface MonthlyStatement {
  siteId: number;
  siteName: string;
  ownerName: string;
  month: string;
  timeZone: string;
  /** Local start and end of the month, ISO 8601 with offset. */
  from: string;
  to: string;
  hours: number;
  partial: boolean;
  generatedAt: string;
  site: StatementFigures;
  units: StatementUnit[];
  days: StatementDay[];
  exclusions: StatementExclusion[];
  tickets: StatementTickets;
  assumptions: {
    energy: string;
    gammaPctPerK: number;
    daylightThresholdWm2: number;
    model: string[];
    notes: string[];
  };
  /** The lock of the month (not part of the checksummed content). */
  lock: StatementLockInfo | null;
}

/** `POST /api/sites/:id/statements/:month/restate`. */
export interface RestateRequest {
  reason: string;
}

/** When a month locks: on the 3rd of the next month at 06:00 in the site's zone (grace for late data). */
export const STATEMENT_LOCK_DAY = 3;
export const STATEMENT_LOCK_HOUR = 6;

/** One month of a site's trend (`GET /api/sites/:id/statement-trend`): the headline figures of its statement. */
export interface StatementTrendMonth {
  month: string;
  partial: boolean;
  /** Whether the site had reported by the end of this month (months before its first report carry no figures). */
  hasData: boolean;
  energyKwh: number;
  yfH: number | null;
  pr: number | null;
  availabilityTimeContractual: number | null;
  availabilityEnergyContractual: number | null;
  gainOverFixedPct: number | null;
  gainOverSunPct: number | null;
  completeness: number;
}

/** The current month so far and the twelve before it, oldest first. */
export interface StatementTrend {
  siteId: number;
  siteName: string;
  timeZone: string;
  months: StatementTrendMonth[];
}
