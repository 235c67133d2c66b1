/**
 * Time-based and energy-based availability, raw and contractual (common practice; physics.md §7, job.md §4):
 * - time-based A = (T_useful − T_down) / T_useful, T_useful the daylight time (in-plane irradiance above a stated
 *   threshold); contractual A adds back the excluded downtime: (T_useful − T_down + T_excluded) / T_useful;
 * - energy-based A = E_actual / (E_actual + E_lost); contractual leaves the excluded lost energy out of the denominator:
 *   E_actual / (E_actual + E_lost − E_lost,excluded) (Klise & Balfour, SAND2015-10223, raw vs contractual availability).
 * Downtime carries an information category of IEC TS 63019:2019 (shared/contracts/tickets.ts, names from memory of the
 * standard); the categories a contract usually excuses are `EXCUSED_CATEGORIES` (common practice; contracts vary).
 * Pure; durations in milliseconds, energy in kWh. Ratios are null when there is no daylight (or no energy) to judge.
 */
import type { AvailabilityCategory } from '../contracts/tickets';

/** Downtime categories a contract commonly excuses: added back in contractual availability. */
export const EXCUSED_CATEGORIES: readonly AvailabilityCategory[] = [
  'requested-shutdown',
  'out-of-environmental-specification',
  'out-of-electrical-specification',
  'scheduled-maintenance',
  'suspended',
  'force-majeure',
];

/** Categories of a unit in service: a ticket carrying one of them does not make time downtime. */
export const IN_SERVICE_CATEGORIES: readonly AvailabilityCategory[] = ['full-performance', 'partial-performance', 'technical-standby'];

export const isExcused = (c: AvailabilityCategory) => EXCUSED_CATEGORIES.includes(c);

/** A stretch of one unit's time with one state. */
export interface AvailabilityPeriod {
  durationMs: number;
  /** Whether it counts as useful time (daylight: in-plane irradiance above the threshold). */
  daylight: boolean;
  /** The downtime category, or null when the unit was available. */
  downCategory: AvailabilityCategory | null;
  /** Energy produced [kWh]. */
  actualKwh: number;
  /** Energy the unit would have produced had it been available [kWh] (0 when available). */
  lostKwh: number;
}

export interface AvailabilityFigures {
  usefulMs: number;
  downMs: number;
  excludedMs: number;
  actualKwh: number;
  lostKwh: number;
  excludedLostKwh: number;
  timeRaw: number | null;
  timeContractual: number | null;
  energyRaw: number | null;
  energyContractual: number | null;
}

/** Availability over periods; only daylight periods count. */
export function availabilityOf(periods: readonly AvailabilityPeriod[]): AvailabilityFigures {
  let usefulMs = 0;
  let downMs = 0;
  let excludedMs = 0;
  let actualKwh = 0;
  let lostKwh = 0;
  let excludedLostKwh = 0;
  for (const [i, p] of periods.entries()) {
    if (!(p.durationMs >= 0) || !(p.actualKwh >= 0) || !(p.lostKwh >= 0) || !Number.isFinite(p.durationMs + p.actualKwh + p.lostKwh))
      throw new RangeError(`periods[${i}]: duration and energies must be finite and not negative`);
    if (!p.daylight) continue;
    usefulMs += p.durationMs;
    actualKwh += p.actualKwh;
    if (p.downCategory === null || IN_SERVICE_CATEGORIES.includes(p.downCategory)) continue;
    downMs += p.durationMs;
    lostKwh += p.lostKwh;
    if (isExcused(p.downCategory)) {
      excludedMs += p.durationMs;
      excludedLostKwh += p.lostKwh;
    }
  }
  const ratio = (num: number, den: number) => (den > 0 ? num / den : null);
  return {
    usefulMs,
    downMs,
    excludedMs,
    actualKwh,
    lostKwh,
    excludedLostKwh,
    timeRaw: ratio(usefulMs - downMs, usefulMs),
    timeContractual: ratio(usefulMs - downMs + excludedMs, usefulMs),
    energyRaw: ratio(actualKwh, actualKwh + lostKwh),
    energyContractual: ratio(actualKwh, actualKwh + lostKwh - excludedLostKwh),
  };
}
