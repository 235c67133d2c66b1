/**
 * Baselines are kept in the run's output, not published: per unit, energy of the unit and of its two twins (fixed tilt at
 * the site's latitude facing the equator; sun-following) under the same sky and shade. `next()` returns one JSON-lines
 * row per unit for the period since the previous call.
 */
import { isoUtc } from './clock';
import type { BaselineEnergy, Fleet } from './fleet';

export interface BaselineRow {
  serial: string;
  site: string;
  start: string;
  end: string;
  unitPoaWhm2: number;
  fixedTiltPoaWhm2: number;
  sunFollowingPoaWhm2: number;
  unitDcWh: number;
  fixedTiltDcWh: number;
  sunFollowingDcWh: number;
}

export function baselineSummary(fleet: Fleet): { next(): BaselineRow[] } {
  let prev = new Map<string, BaselineEnergy>(fleet.baselines().map((b) => [b.serial, b]));
  let prevMs = fleet.now();
  const r = (x: number) => Math.round(x * 10) / 10;
  return {
    next() {
      const nowMs = fleet.now();
      if (nowMs <= prevMs) return [];
      const cur = fleet.baselines();
      const rows = cur.map((b) => {
        const p = prev.get(b.serial)!;
        return {
          serial: b.serial,
          site: b.siteCode,
          start: isoUtc(prevMs),
          end: isoUtc(nowMs),
          unitPoaWhm2: r(b.unitPoaWhm2 - p.unitPoaWhm2),
          fixedTiltPoaWhm2: r(b.fixedTiltPoaWhm2 - p.fixedTiltPoaWhm2),
          sunFollowingPoaWhm2: r(b.sunFollowingPoaWhm2 - p.sunFollowingPoaWhm2),
          unitDcWh: r(b.unitDcWh - p.unitDcWh),
          fixedTiltDcWh: r(b.fixedTiltDcWh - p.fixedTiltDcWh),
          sunFollowingDcWh: r(b.sunFollowingDcWh - p.sunFollowingDcWh),
        };
      });
      prev = new Map(cur.map((b) => [b.serial, b]));
      prevMs = nowMs;
      return rows;
    },
  };
}
