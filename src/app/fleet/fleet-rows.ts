import type { Site, Unit } from '../../../shared/contracts/api';
import type { UnitLiveState } from '../../../shared/contracts/live';
import type { AlarmView } from '../core/alarm-api';
import { severityLook, sortAlarms } from '../live/alarm-look';
import { shortfallPercent, statusLook, statusRank, type StatusLook, type Tone } from '../live/unit-status';

/** One line of the fleet board. */
export interface FleetRow {
  unit: Unit;
  site: Site | undefined;
  live: UnitLiveState | undefined;
  look: StatusLook;
  /** Shortfall against the site's modelled best orientation [%], null when unknown or at night. */
  shortfall: number | null;
  alarms: AlarmView[];
  /** Most urgent alarm severity (P1 … P4), or null. */
  worstSeverity: string | null;
}

export type FleetSortKey = 'serial' | 'site' | 'state' | 'power' | 'poa' | 'shortfall' | 'alarms' | 'lastReport';

export interface FleetFilter {
  /** Free text matched against serial and site name (case-insensitive). */
  text: string;
  siteId: number | null;
  tone: Tone | 'alarm' | null;
}

/** Joins units with their site, live state, the modelled best and active alarms. */
export function fleetRows(
  units: readonly Unit[],
  sites: ReadonlyMap<number, Site>,
  live: ReadonlyMap<number, UnitLiveState>,
  bestBySite: ReadonlyMap<number, number>,
  alarms: readonly AlarmView[],
): FleetRow[] {
  const byUnit = new Map<number, AlarmView[]>();
  for (const a of alarms) {
    if (a.unitId === null || a.state === 'cleared') continue;
    byUnit.set(a.unitId, [...(byUnit.get(a.unitId) ?? []), a]);
  }
  return units.map((unit) => {
    const state = live.get(unit.id);
    const unitAlarms = sortAlarms(byUnit.get(unit.id) ?? []);
    const site = sites.get(unit.siteId);
    return {
      unit,
      site,
      live: state,
      look: statusLook(state),
      // Indoors the building switches the lamps, and the model cannot know which are on: no shortfall is claimed there.
      shortfall: state?.online && !site?.indoor ? shortfallPercent(state.poaWm2, bestBySite.get(unit.siteId)) : null,
      alarms: unitAlarms,
      worstSeverity: unitAlarms[0]?.severity ?? null,
    };
  });
}

export function filterRows(rows: readonly FleetRow[], f: FleetFilter): FleetRow[] {
  const text = f.text.trim().toLowerCase();
  return rows.filter(
    (r) =>
      (!text || r.unit.serial.toLowerCase().includes(text) || (r.site?.name.toLowerCase().includes(text) ?? false)) &&
      (f.siteId === null || r.unit.siteId === f.siteId) &&
      (f.tone === null || (f.tone === 'alarm' ? r.alarms.length > 0 : r.look.tone === f.tone)),
  );
}

const missingLast = (a: number | null | undefined, b: number | null | undefined, dir: number) => {
  const an = a === null || a === undefined;
  const bn = b === null || b === undefined;
  if (an || bn) return an === bn ? 0 : an ? 1 : -1; // missing values sink whatever the direction
  return (a - b) * dir;
};

/** Sorts a copy; ties keep serial order. Missing values always go last. */
export function sortRows(rows: readonly FleetRow[], key: FleetSortKey, direction: 'asc' | 'desc'): FleetRow[] {
  const dir = direction === 'asc' ? 1 : -1;
  const cmp = (a: FleetRow, b: FleetRow): number => {
    switch (key) {
      case 'serial':
        return a.unit.serial.localeCompare(b.unit.serial) * dir;
      case 'site':
        return (a.site?.name ?? '').localeCompare(b.site?.name ?? '') * dir;
      case 'state':
        return (statusRank(a.look) - statusRank(b.look)) * dir;
      case 'power':
        return missingLast(a.live?.dcPowerW, b.live?.dcPowerW, dir);
      case 'poa':
        return missingLast(a.live?.poaWm2, b.live?.poaWm2, dir);
      case 'shortfall':
        return missingLast(a.shortfall, b.shortfall, dir);
      case 'alarms': {
        // Ascending = most urgent first (P1 before P4); units without alarms always last.
        const rank = (r: FleetRow) => (r.worstSeverity ? severityLook(r.worstSeverity).rank : null);
        return missingLast(rank(a), rank(b), dir) || (b.alarms.length - a.alarms.length) * dir;
      }
      case 'lastReport':
        return missingLast(
          a.live?.lastReportAt ? Date.parse(a.live.lastReportAt) : null,
          b.live?.lastReportAt ? Date.parse(b.live.lastReportAt) : null,
          dir,
        );
    }
  };
  return [...rows].sort((a, b) => cmp(a, b) || a.unit.serial.localeCompare(b.unit.serial));
}

/** Count of rows per tone, for the summary chips. */
export function toneCounts(rows: readonly FleetRow[]): Record<Tone | 'alarm', number> {
  const c: Record<Tone | 'alarm', number> = { good: 0, busy: 0, caution: 0, problem: 0, stopped: 0, alarm: 0 };
  for (const r of rows) {
    c[r.look.tone]++;
    if (r.alarms.length) c.alarm++;
  }
  return c;
}

/** Applies a batch of live states to a map (returns a new map so signals notice). */
export function mergeStates(
  current: ReadonlyMap<number, UnitLiveState>,
  states: readonly UnitLiveState[],
  replace = false,
): Map<number, UnitLiveState> {
  const next = replace ? new Map<number, UnitLiveState>() : new Map(current);
  for (const s of states) next.set(s.unitId, s);
  return next;
}
