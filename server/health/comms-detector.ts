/**
 * Comms loss: a unit silent for `commsIntervals` report intervals (measured per unit from its own timestamps), or whose
 * last-will message said it went offline, is lost. Judged on the engine's clock (arrival time), not on the units'
 * timestamps, so a store-and-forward backlog arriving late does not hide the gap. A site where most units are silent at
 * once is dark: one site alarm instead of one per unit (the health engine does the grouping).
 */
import type { HealthSettings } from './health-settings';

interface UnitState {
  lastArrivalMs: number;
  lastTsMs: number;
  intervalMs: number | null;
  offlineSinceMs: number | null;
}

export interface CommsView {
  silent: boolean;
  silentForMs: number;
  lastArrivalMs: number;
  offlineByWill: boolean;
  intervalMs: number;
  /** When the unit counted as silent (last-will arrival, or the last message plus the allowed intervals) [ms]. */
  silentSinceMs: number;
}

export class CommsDetector {
  private readonly units = new Map<number, UnitState>();

  /** A message of any kind arrived from the unit at `nowMs` carrying timestamp `tsMs`. */
  heard(unitId: number, nowMs: number, tsMs: number, isTelemetry: boolean): void {
    const u = this.units.get(unitId);
    if (!u) {
      this.units.set(unitId, { lastArrivalMs: nowMs, lastTsMs: tsMs, intervalMs: null, offlineSinceMs: null });
      return;
    }
    if (isTelemetry && tsMs > u.lastTsMs) {
      const gap = tsMs - u.lastTsMs;
      // Typical interval: follows small gaps quickly, ignores outages (gaps far above the current estimate).
      if (u.intervalMs === null) u.intervalMs = gap;
      else if (gap < 3 * u.intervalMs) u.intervalMs = 0.8 * u.intervalMs + 0.2 * gap;
      u.lastTsMs = tsMs;
    }
    u.lastArrivalMs = Math.max(u.lastArrivalMs, nowMs);
    u.offlineSinceMs = null;
  }

  /** What the store last heard of a unit before a restart (arrival and unit timestamp) — only if nothing newer is known. */
  restore(unitId: number, lastArrivalMs: number, lastTsMs: number): void {
    if (!this.units.has(unitId)) this.units.set(unitId, { lastArrivalMs, lastTsMs, intervalMs: null, offlineSinceMs: null });
  }

  /** The unit's last will (or a clean offline status) arrived. */
  offline(unitId: number, nowMs: number): void {
    const u = this.units.get(unitId);
    if (u) u.offlineSinceMs ??= nowMs;
    else this.units.set(unitId, { lastArrivalMs: nowMs, lastTsMs: nowMs, intervalMs: null, offlineSinceMs: nowMs });
  }

  view(unitId: number, nowMs: number, s: HealthSettings): CommsView | undefined {
    const u = this.units.get(unitId);
    if (!u) return undefined;
    const intervalMs = u.intervalMs ?? s.reportIntervalS * 1000;
    const silentForMs = nowMs - u.lastArrivalMs;
    const offlineByWill = u.offlineSinceMs !== null;
    const allowedMs = s.commsIntervals * intervalMs;
    const silentSinceMs = offlineByWill ? Math.min(u.offlineSinceMs!, u.lastArrivalMs + allowedMs) : u.lastArrivalMs + allowedMs;
    return {
      silent: offlineByWill || silentForMs > allowedMs,
      silentForMs,
      lastArrivalMs: u.lastArrivalMs,
      offlineByWill,
      intervalMs,
      silentSinceMs,
    };
  }

  /** When the unit's last message arrived [ms], if it was ever heard. */
  lastArrival(unitId: number): number | undefined {
    return this.units.get(unitId)?.lastArrivalMs;
  }

  known(): number[] {
    return [...this.units.keys()];
  }

  forget(unitId: number): void {
    this.units.delete(unitId);
  }
}
