/**
 * An open trap alarm judged again against a new site model (after the site's survey changed): the unit's latest
 * readings in the alarm's evidence against the new model's brightest reachable orientation at that instant. A trap the
 * new model would not have raised — the unit gets at least `trapRatio` of the best, or the best is too dim to judge —
 * no longer holds, so the alarm can be cleared at once rather than waiting for the clear delay; one that still holds
 * stays open, and the detector goes on judging it against the new model with every report. Pure: no clock or I/O.
 */
import type { Alarm } from './alarm-types';
import type { HealthSettings } from './health-settings';
import type { SiteModel } from './site-model';

export interface TrapReadings {
  ts: string;
  poaWm2: number;
  tiltDeg: number;
  azimuthDeg: number;
}

/** The latest readings an open trap alarm carries (refreshed while it stays open), or null when it has none. */
export function latestTrapReadings(a: Alarm): TrapReadings | null {
  const latest = (a.evidence['latest'] as { readings?: unknown } | undefined)?.readings;
  const r = (latest ?? a.evidence['readings']) as Partial<TrapReadings> | undefined;
  if (!r || typeof r.ts !== 'string' || ![r.poaWm2, r.tiltDeg, r.azimuthDeg].every((x) => typeof x === 'number' && Number.isFinite(x)))
    return null;
  return { ts: r.ts, poaWm2: r.poaWm2!, tiltDeg: r.tiltDeg!, azimuthDeg: r.azimuthDeg! };
}

export interface TrapVerdict {
  holds: boolean;
  /** The unit's in-plane irradiance over the new model's best [0…]. */
  ratio: number;
  bestWm2: number;
}

export function trapUnderModel(r: TrapReadings, model: SiteModel, s: HealthSettings): TrapVerdict {
  const bestWm2 = model.globalMax.wm2;
  const ratio = bestWm2 > 0 ? r.poaWm2 / bestWm2 : 1;
  return { holds: bestWm2 >= s.trapMinBestWm2 && ratio < s.trapRatio, ratio, bestWm2 };
}
