/**
 * Health thresholds: one documented default per setting, overridable per site. Every number here is a setting, not a
 * constant of nature; the comments say where a default comes from ("common practice" = usual in tracker O&M, not tied to
 * one source). Times in minutes, irradiance in W/m², angles in degrees, currents in A.
 */
import { z } from 'zod';
import { MODULE_POWER_TEMP_COEFF_PER_K } from '../../shared/contracts/pv-module';
import { TRAP_RATIO } from '../../shared/landscape/best-orientation';

export interface HealthSettings {
  // ---- daylight gating
  /** Production checks run only while the modelled best orientation of the site gets at least this [W/m²] (common practice: 50–100). */
  daylightMinWm2: number;
  /** …and the sun is at least this high, for outdoor sites [°] (common practice: 5–10). Indoor sites (lamps) use the irradiance alone. */
  daylightMinSunElevationDeg: number;

  // ---- local-maximum trap
  /** Trapped when the in-plane irradiance is below this fraction of the modelled global maximum. */
  trapRatio: number;
  /** …and below this fraction of the site peers' upper quartile (when the site has at least two comparable peers). */
  trapPeerRatio: number;
  /** Which quantile of the peers' in-plane irradiance stands for "what the site gets". */
  trapPeerQuantile: number;
  /** The model counts as confirmed at the unit's own orientation when measured and modelled in-plane irradiance agree within this fraction; then a trap is raised even when every peer is trapped too. */
  trapModelAgreement: number;
  /** A trap clears once the unit gets more than this fraction of the global maximum (hysteresis above trapRatio). */
  trapClearRatio: number;
  /** A unit that has been seeking for longer than this is no longer settled [min] (shorter re-seeks keep the state). */
  trapSeekGraceMin: number;
  trapDelayOnMin: number;
  trapClearDelayMin: number;
  /** Each detector must read at least this fraction of its partner: a dead or failing detector is a different fault. */
  trapPairSanity: number;
  /** Units of one site trapped at once from which the trap alarms become P2. */
  trapManyUnits: number;
  /** Traps are judged only while the modelled best orientation gets at least this [W/m²]: below it a 15 % deficit is a few tens of W/m², within model and sensor error and not worth a visit (a stricter gate than the daylight gate). */
  trapMinBestWm2: number;
  /** A settled unit's detector pairs must agree with the model at its orientation: each pair's ratio (plus over minus) within this fraction of the modelled ratio. A larger mismatch means the unit balanced on a drifting or shaded detector, a sensor fault the drift detector reports, not a trap. Wider than the drift tolerance: the modelled ratio is only as good as the survey (at dawn under a survey off by the `high` evaluation error, trapped units' pairs read 5–12 % off the model). */
  trapPairModelTolerance: number;

  // ---- actuator stall / slip
  /** Motor current that counts as an anomaly (stall or overload) [A]; common practice 1.2–1.5 × rated, here ≈ 2.5 × running current. */
  motorOverCurrentA: number;
  /** Commanded minus measured angle beyond which a drive that makes no progress counts as stalled [°]. */
  stallAngleErrorDeg: number;
  /** Progress below this between two reports counts as none [°] (common practice: < 0.2° over 30 s of drive). */
  stallNoProgressDeg: number;
  stallDelayOnMin: number;
  stallClearDelayMin: number;

  // ---- detector drift / dead / saturated
  /** A detector whose reading, relative to the reference cell and normalised by the modelled landscape, departs from 1 by more than this drifts (common practice: gain mismatch > 3–5 %). */
  driftTolerance: number;
  /** Back within this to clear (hysteresis). */
  driftClearTolerance: number;
  /** Below this normalised reading a detector is dead. */
  deadFraction: number;
  /** A reading at or above this is saturated [W/m²]. */
  saturationWm2: number;
  /** Samples are used only where the model agrees with the reference cell within this fraction. */
  driftModelAgreement: number;
  /** …and the modelled reading of the detector (and the panel's, measured and modelled) is at least this [W/m²]. Low
   * enough for the shade of a tower or a late afternoon, where a dead detector must still be found; detector noise
   * (a few tenths of a W/m², common practice) stays well under the tolerance there. */
  driftMinWm2: number;
  /** Pointing uncertainty of a reported orientation (backlash, encoder resolution) [°]. */
  driftPointingToleranceDeg: number;
  /** Samples are used only where the modelled readings change by less than this fraction within the pointing uncertainty (smooth landscape). */
  driftMaxModelChange: number;
  /** Median over this window [min]. */
  driftWindowMin: number;
  driftDelayOnMin: number;
  driftClearDelayMin: number;

  // ---- hunting
  /** A reversal is a change of direction of motion of at least this between reports [°]. */
  huntingStepDeg: number;
  /** Reversals per hour (both axes) above which a unit hunts (common practice: a multiple of the clear-sky baseline). */
  huntingReversalsPerHour: number;
  /** …while its net motion is below this fraction of the path travelled. */
  huntingNetFraction: number;
  huntingWindowMin: number;
  /** When at least this share of a site's reporting units move like that at once, it is the sky (passing clouds), not one unit. */
  huntingSiteShare: number;
  /** Largest variation of the unit's in-plane irradiance over the window (standard deviation / mean) for its motion to
   * count as hunting: back-and-forth under changing light (passing clouds) is the unit following the light. */
  huntingMaxLightVariation: number;
  huntingDelayOnMin: number;
  huntingClearDelayMin: number;

  // ---- comms loss
  /** Silent for this many report intervals counts as lost (common practice: > 3). */
  commsIntervals: number;
  /** Report interval assumed before one is measured [s]. */
  reportIntervalS: number;
  /** Delay before a comms alarm in daylight [min] (common practice: up to 15). */
  commsDelayOnMin: number;
  /** …and at night, when the alarm is also one severity lower [min]. */
  commsNightDelayOnMin: number;
  commsClearDelayMin: number;
  /** A site counts as dark when at least this fraction of its units is silent (and at least two are). */
  siteDarkFraction: number;

  // ---- soiling / underperformance
  /** Temperature coefficient of module power [1/K] (crystalline silicon, common practice −0.3…−0.45 %/K). */
  powerTempCoeffPerK: number;
  /** Samples for the performance index need at least this in-plane irradiance [W/m²]. */
  soilingMinPoaWm2: number;
  /** Own history kept for the clean reference [days]. */
  soilingHistoryDays: number;
  /** Clean reference: this quantile of the hourly medians in the history. */
  soilingReferenceQuantile: number;
  /** Loss against the clean reference that raises the alarm (common practice: 3–5 %). */
  soilingLossThreshold: number;
  /** Loss below which it clears (hysteresis; a cleaning or rain brings the index back). */
  soilingClearLoss: number;
  /** Hourly medians needed before the reference counts. */
  soilingMinHours: number;
  soilingDelayOnMin: number;
  soilingClearDelayMin: number;

  // ---- stow
  /** Gust above which every unit of the site must stow [m/s] (manufacturer value; often 14–20). */
  stowGustMs: number;
  /** Time allowed to reach stow [min] (common practice: 2–5). */
  stowArrivalMin: number;
  /** Tilt counted as stowed [°]. */
  stowTiltDeg: number;
  /** Gusts stay below the limit this long before the stow watch ends [min]. */
  stowReleaseMin: number;
}

export const DEFAULT_HEALTH_SETTINGS: Readonly<HealthSettings> = Object.freeze({
  daylightMinWm2: 100,
  daylightMinSunElevationDeg: 5,

  trapRatio: TRAP_RATIO,
  trapPeerRatio: 0.9,
  trapPeerQuantile: 0.75,
  trapModelAgreement: 0.1,
  trapClearRatio: 0.88,
  trapSeekGraceMin: 3,
  trapDelayOnMin: 10,
  trapClearDelayMin: 3,
  trapPairSanity: 0.05,
  trapManyUnits: 3,
  trapMinBestWm2: 150,
  trapPairModelTolerance: 0.1,

  motorOverCurrentA: 3,
  stallAngleErrorDeg: 1,
  stallNoProgressDeg: 0.2,
  stallDelayOnMin: 1,
  stallClearDelayMin: 3,

  driftTolerance: 0.06,
  driftClearTolerance: 0.04,
  deadFraction: 0.1,
  saturationWm2: 4990,
  driftModelAgreement: 0.1,
  driftMinWm2: 40,
  driftPointingToleranceDeg: 0.5,
  driftMaxModelChange: 0.02,
  driftWindowMin: 10,
  driftDelayOnMin: 10,
  driftClearDelayMin: 10,

  huntingStepDeg: 2,
  huntingReversalsPerHour: 50,
  huntingNetFraction: 0.3,
  huntingWindowMin: 10,
  huntingSiteShare: 0.5,
  huntingMaxLightVariation: 0.3,
  huntingDelayOnMin: 5,
  huntingClearDelayMin: 10,

  commsIntervals: 3,
  reportIntervalS: 5,
  commsDelayOnMin: 5,
  commsNightDelayOnMin: 30,
  commsClearDelayMin: 0,
  siteDarkFraction: 0.6,

  powerTempCoeffPerK: MODULE_POWER_TEMP_COEFF_PER_K,
  soilingMinPoaWm2: 300,
  soilingHistoryDays: 14,
  soilingReferenceQuantile: 0.9,
  soilingLossThreshold: 0.04,
  soilingClearLoss: 0.02,
  soilingMinHours: 3,
  soilingDelayOnMin: 60,
  soilingClearDelayMin: 30,

  stowGustMs: 18,
  stowArrivalMin: 3,
  stowTiltDeg: 2,
  stowReleaseMin: 10,
});

/** The range a setting may take [min, max] in its unit; `integer` for counts. */
export interface HealthSettingRange {
  min: number;
  max: number;
  unit: string;
  integer?: boolean;
}

const fraction = (min: number, max: number): HealthSettingRange => ({ min, max, unit: '(fraction)' });
const minutes = (max: number): HealthSettingRange => ({ min: 0, max, unit: 'min' });

/**
 * Every setting's allowed range. A range keeps a value physically meaningful and keeps a detector able to fire: a limit
 * no reading can reach (a gust limit of 1e300 m/s, a stow tilt of 90°, a delay of a year) would switch an alarm off
 * without saying so, so the upper ends stop well before that. Delays are bounded per detector by how long the fault
 * may go unreported (a stall within the hour, soiling within two days); fractions lie within 0…1.
 */
export const HEALTH_SETTING_RANGES: Readonly<Record<keyof HealthSettings, HealthSettingRange>> = Object.freeze({
  daylightMinWm2: { min: 10, max: 500, unit: 'W/m²' },
  daylightMinSunElevationDeg: { min: 0, max: 30, unit: '°' },

  trapRatio: fraction(0.5, 0.99),
  trapPeerRatio: fraction(0.5, 0.99),
  trapPeerQuantile: fraction(0.5, 1),
  trapModelAgreement: fraction(0.01, 0.5),
  trapClearRatio: fraction(0.5, 1),
  trapSeekGraceMin: minutes(60),
  trapDelayOnMin: minutes(240),
  trapClearDelayMin: minutes(240),
  trapPairSanity: fraction(0, 0.9),
  trapManyUnits: { min: 1, max: 500, unit: 'units', integer: true },
  trapMinBestWm2: { min: 0, max: 800, unit: 'W/m²' },
  trapPairModelTolerance: fraction(0.01, 0.5),

  motorOverCurrentA: { min: 0.1, max: 50, unit: 'A' },
  stallAngleErrorDeg: { min: 0.1, max: 45, unit: '°' },
  stallNoProgressDeg: { min: 0.01, max: 5, unit: '°' },
  stallDelayOnMin: minutes(60),
  stallClearDelayMin: minutes(240),

  driftTolerance: fraction(0.01, 0.5),
  driftClearTolerance: fraction(0.005, 0.5),
  deadFraction: fraction(0, 0.9),
  // Sunlight with reflections stays below about 1,500 W/m²; a lower limit would call ordinary readings saturated.
  saturationWm2: { min: 1500, max: 10000, unit: 'W/m²' },
  driftModelAgreement: fraction(0.01, 0.5),
  driftMinWm2: { min: 0, max: 1000, unit: 'W/m²' },
  driftPointingToleranceDeg: { min: 0, max: 10, unit: '°' },
  driftMaxModelChange: fraction(0.001, 0.5),
  driftWindowMin: { min: 1, max: 240, unit: 'min' },
  driftDelayOnMin: minutes(720),
  driftClearDelayMin: minutes(720),

  huntingStepDeg: { min: 0.1, max: 30, unit: '°' },
  // At one report a second a unit can reverse at most 3,600 times an hour.
  huntingReversalsPerHour: { min: 1, max: 3600, unit: 'reversals/h' },
  huntingNetFraction: fraction(0.01, 1),
  huntingWindowMin: { min: 1, max: 240, unit: 'min' },
  huntingSiteShare: fraction(0.1, 1),
  huntingMaxLightVariation: fraction(0.01, 1),
  huntingDelayOnMin: minutes(240),
  huntingClearDelayMin: minutes(240),

  commsIntervals: { min: 1, max: 100, unit: 'report intervals' },
  reportIntervalS: { min: 1, max: 3600, unit: 's' },
  commsDelayOnMin: minutes(60),
  commsNightDelayOnMin: minutes(720),
  commsClearDelayMin: minutes(60),
  siteDarkFraction: fraction(0.1, 1),

  // Crystalline silicon −0.3…−0.45 %/K, thin film about −0.2 %/K; module power never rises with temperature.
  powerTempCoeffPerK: { min: -0.01, max: 0, unit: '1/K' },
  soilingMinPoaWm2: { min: 50, max: 1000, unit: 'W/m²' },
  soilingHistoryDays: { min: 1, max: 365, unit: 'days' },
  soilingReferenceQuantile: fraction(0.5, 1),
  soilingLossThreshold: fraction(0.005, 0.5),
  soilingClearLoss: fraction(0, 0.5),
  soilingMinHours: { min: 1, max: 1000, unit: 'hours', integer: true },
  soilingDelayOnMin: minutes(2880),
  soilingClearDelayMin: minutes(2880),

  // Trackers are built to stow well below storm force (about 25 m/s); 35 m/s is past anything a unit survives unstowed.
  stowGustMs: { min: 5, max: 35, unit: 'm/s' },
  stowArrivalMin: { min: 0.5, max: 30, unit: 'min' },
  // Stow is flat for these units; a larger "stowed" tilt would count units still facing the wind as stowed.
  stowTiltDeg: { min: 0, max: 15, unit: '°' },
  stowReleaseMin: { min: 1, max: 240, unit: 'min' },
});

function rangeSchema(r: HealthSettingRange) {
  const message = `Must be between ${r.min} and ${r.max} ${r.unit}.`;
  const n = z
    .number({ error: `Must be a number (${r.unit}).` })
    .min(r.min, message)
    .max(r.max, message);
  return r.integer ? n.int('Must be a whole number.') : n;
}

/** Pairs whose order makes the hysteresis: the clear threshold must lie on the far side of the raise threshold. */
const HYSTERESIS: { clear: keyof HealthSettings; raise: keyof HealthSettings; clearIs: 'at least' | 'at most' }[] = [
  { clear: 'trapClearRatio', raise: 'trapRatio', clearIs: 'at least' },
  { clear: 'driftClearTolerance', raise: 'driftTolerance', clearIs: 'at most' },
  { clear: 'soilingClearLoss', raise: 'soilingLossThreshold', clearIs: 'at most' },
];

/**
 * Per-site overrides: any subset of the settings, each within its range (HEALTH_SETTING_RANGES); hysteresis pairs are
 * checked on the effective values (the overrides over the defaults), so an override may not cross a default either.
 */
export const healthSettingsOverrideSchema = z
  .strictObject(
    Object.fromEntries(Object.entries(HEALTH_SETTING_RANGES).map(([k, r]) => [k, rangeSchema(r).optional()])) as Record<
      keyof HealthSettings,
      z.ZodOptional<z.ZodNumber>
    >,
  )
  .superRefine((o, ctx) => {
    const eff = resolveHealthSettings(Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)));
    const inRange = (k: keyof HealthSettings) => rangeSchema(HEALTH_SETTING_RANGES[k]).safeParse(eff[k]).success;
    for (const h of HYSTERESIS) {
      if (!inRange(h.clear) || !inRange(h.raise)) continue; // the range message says enough
      const ok = h.clearIs === 'at least' ? eff[h.clear] >= eff[h.raise] : eff[h.clear] <= eff[h.raise];
      if (!ok) ctx.addIssue({ code: 'custom', path: [h.clear], message: `Must be ${h.clearIs} ${h.raise} (${eff[h.raise]}).` });
    }
  });

/**
 * Overrides read back from the database, keeping only known settings within their ranges (rows written before the
 * ranges existed may hold anything); each dropped one is reported so it can be logged, and its default applies.
 */
export function sanitizeStoredOverrides(
  stored: Record<string, unknown> | null | undefined,
  dropped: (key: string, value: unknown) => void = () => undefined,
): HealthSettingsOverride {
  const out: Record<string, number> = {};
  for (const [k, v] of Object.entries(stored ?? {})) {
    const range = HEALTH_SETTING_RANGES[k as keyof HealthSettings];
    if (range && rangeSchema(range).safeParse(v).success) out[k] = v as number;
    else dropped(k, v);
  }
  return out;
}
export type HealthSettingsOverride = Partial<HealthSettings>;

/** Defaults with a site's overrides on top. */
export function resolveHealthSettings(override: HealthSettingsOverride | null | undefined): HealthSettings {
  return { ...DEFAULT_HEALTH_SETTINGS, ...(override ?? {}) };
}

export const MIN_MS = 60_000;
