/**
 * The evaluation's fault schedule: which unit gets which fault, when and for how long. Faults start while the sun is up
 * (a stall at night, with nothing asking the drive to move, is invisible to any detector until morning) and last long
 * enough to matter; a unit has one fault at a time, with a gap between faults; a share of the fleet stays fault-free.
 * Everything is drawn from a seeded stream, so a seed gives the same schedule.
 */
import { solarPosition } from '../../shared/solar-position';
import type { FaultKind } from '../../simulator/faults';
import type { Rng } from '../../simulator/rng';
import type { SiteInfo } from '../../simulator/scenarios';

/**
 * `lesser-peak`: the unit is sent into the basin of a lesser peak of its true landscape, as an operator's go-to to the
 * wrong place would (target even), or as a crew leaves it after maintenance (target odd: held for `holdS`, then parked
 * there and released). It then stays trapped as long as that basin lasts; the simulator's trap observer records it.
 */
export type EvalFaultKind = FaultKind | 'lesser-peak';

export interface ScheduledFault {
  serial: string;
  kind: EvalFaultKind;
  startMs: number;
  durationS: number;
  target: number;
  /** Maintenance hold before a `lesser-peak` relocation [s] (0: a go-to). */
  holdS?: number;
}

/**
 * Kinds injected, and how long each lasts [h] (uniform in the range). Soiling runs from its start to a cleaning.
 * Traps come two ways: the scenarios' skies (facade reflections, courtyard shade, lamps, broken cloud) trap units with
 * narrow detectors by themselves, and `lesser-peak` sends a unit into the basin of a lesser peak (its hours are the time
 * left to it before the next fault); the simulator records every trap it observes as truth. (The simulator's injected
 * "trap" narrows the detectors to 4°, which is a change of detector geometry the drift detector rightly reports, so it
 * is not used.)
 */
export const EVAL_FAULTS: { kind: EvalFaultKind; hours: [number, number] }[] = [
  { kind: 'stall', hours: [1, 3] },
  { kind: 'drift', hours: [3, 10] },
  { kind: 'dead-detector', hours: [2, 5] },
  { kind: 'hunting', hours: [1, 3] },
  { kind: 'comms-loss', hours: [0.25, 1.5] },
  { kind: 'soiling', hours: [40, 96] },
  { kind: 'lesser-peak', hours: [2, 6] },
];

/** Maintenance hold before a unit is left in a lesser peak's basin [min] (uniform). */
export const MAINTENANCE_HOLD_MIN: [number, number] = [20, 60];

const HOUR = 3_600_000;

export interface ScheduleInput {
  units: { serial: string; site: SiteInfo }[];
  startMs: number;
  endMs: number;
  rng: Rng;
  /** Share of units left fault-free. */
  faultFreeShare: number;
}

/** Whether the sun is at least `deg` high at a site. */
export function sunAbove(site: SiteInfo, ms: number, deg: number): boolean {
  return (
    solarPosition({ latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM }, ms).elevationDeg >= deg
  );
}

export function scheduleFaults(input: ScheduleInput): ScheduledFault[] {
  const out: ScheduledFault[] = [];
  const { rng } = input;
  input.units.forEach((u) => {
    if (rng.next() < input.faultFreeShare) return;
    let t = input.startMs + rng.uniform(2, 10) * HOUR;
    let soiled = false;
    for (let guard = 0; guard < 200 && t < input.endMs; guard++) {
      const options = EVAL_FAULTS.filter((f) => f.kind !== 'soiling' || (!soiled && input.endMs - t > 48 * HOUR));
      const f = options[Math.floor(rng.next() * options.length)]!;
      const hours = rng.uniform(f.hours[0], f.hours[1]);
      // Start at the next quarter hour with the sun up now and for the first hour of the fault.
      let start = t;
      while (start < input.endMs && !(sunAbove(u.site, start, 15) && sunAbove(u.site, start + HOUR, 15))) start += HOUR / 4;
      if (start + HOUR > input.endMs) break;
      const durationS = Math.round(Math.min(hours * HOUR, f.kind === 'soiling' ? input.endMs - start : hours * HOUR) / 1000);
      const target = Math.floor(rng.next() * 4);
      const holdS = f.kind === 'lesser-peak' && target % 2 === 1 ? Math.round(rng.uniform(...MAINTENANCE_HOLD_MIN) * 60) : undefined;
      out.push({ serial: u.serial, kind: f.kind, startMs: start, durationS, target, ...(holdS !== undefined ? { holdS } : {}) });
      if (f.kind === 'soiling') soiled = true;
      t = start + durationS * 1000 + rng.uniform(1, 4) * HOUR;
    }
  });
  return out.sort((a, b) => a.startMs - b.startMs);
}
