/**
 * Units sent into the basin of a lesser peak of their true landscape (the evaluation's `lesser-peak` fault): the peak is
 * found on the simulator's true sky at the moment (local maxima of the landscape, and their basins for the unit's own
 * detector tilt, shared/landscape), among the peaks under `RELOCATE_MAX_RATIO` of the best reachable orientation
 * (`bestReachableOrientationWith` through the fleet, the one definition). The unit then gets the commands a server would
 * send it: a go-to there, or a maintenance hold, then at its end a go-to there and the release. From there the unit's
 * own control climbs the basin and stays on its peak for as long as the basin lasts; the simulator's trap observer
 * records the trap as truth. Most skies have one peak most of the day (the glass facade's second lobe shows in the
 * morning and late afternoon), so when the landscape has no such peak it is tried again every `RETRY_MIN` while the
 * fault's time lasts (less the last hour, time enough to settle and be seen).
 */
import { analysePeaks, basinShares, blurLandscape, computeLandscape, TRAP_RATIO } from '../../shared/landscape';
import type { Command } from '../../shared/contracts/wire';
import { WIRE_VERSION } from '../../shared/contracts/wire-format';
import { normalFromTiltAzimuth } from '../../shared/sphere/directions';
import { isoUtc } from '../../simulator/clock';
import type { Fleet } from '../../simulator/fleet';
import type { UnitRef } from '../../server/health/unit-sample';
import type { ScheduledFault } from './fault-schedule';

/** A lesser peak qualifies when it gets less than this fraction of the best reachable irradiance (a margin under TRAP_RATIO). */
export const RELOCATE_MAX_RATIO = TRAP_RATIO - 0.05;
/** …and its basin (for the unit's detector tilt) holds at least this share of the reachable orientations. */
const MIN_BASIN_SHARE = 0.01;
const RETRY_MIN = 15;
const MIN = 60_000;

interface Pending {
  f: ScheduledFault;
  /** When to try placing it next [ms]. */
  atMs: number;
  giveUpMs: number;
  held: boolean;
}

export interface Relocations {
  /** Takes a scheduled `lesser-peak` fault at its start. */
  add(f: ScheduledFault): void;
  /** Sends the commands due now. */
  step(): void;
  counts(): { scheduled: number; placed: number };
}

export function createRelocations(fleet: Fleet, refs: ReadonlyMap<string, UnitRef>): Relocations {
  const pending: Pending[] = [];
  let scheduled = 0;
  let placed = 0;
  let seq = 0;
  const send = (serial: string, kind: Command['kind'], extra: Partial<Command> = {}) =>
    fleet.command(serial, { v: WIRE_VERSION, commandId: `eval-${++seq}`, ts: isoUtc(fleet.now()), kind, ...extra } as Command);

  /** A lesser peak of the unit's true landscape now, or null. */
  function lesserPeak(serial: string): { tiltDeg: number; azimuthDeg: number } | null {
    const u = fleet.unit(serial);
    const c = fleet.conditions(serial.slice(0, serial.indexOf('-')));
    if (!u || !c) return null;
    const best = fleet.bestReachable(c.field);
    if (best.wm2 < 150) return null;
    const raw = computeLandscape(c.field.sky, { stepDeg: 2, tiltRangeDeg: [u.tiltSpec.minDeg, u.tiltSpec.maxDeg] });
    const peaks = analysePeaks(raw);
    const shares = basinShares(peaks, blurLandscape(raw, u.detectorTiltDeg));
    const candidates = peaks.peaks.filter(
      (p) =>
        (shares.get(p.node) ?? 0) >= MIN_BASIN_SHARE &&
        c.field.irradiance(normalFromTiltAzimuth(p.tiltDeg, p.azimuthDeg)) < RELOCATE_MAX_RATIO * best.wm2,
    );
    if (!candidates.length) return null;
    // The brightest of them: a go-to to the wrong lobe goes to one that looks plausible.
    const p = candidates[0]!;
    return { tiltDeg: p.tiltDeg, azimuthDeg: p.azimuthDeg };
  }

  return {
    add(f) {
      scheduled++;
      const now = fleet.now();
      const maintenance = (f.holdS ?? 0) > 0;
      if (maintenance) {
        send(f.serial, 'hold');
        refs.get(f.serial)!.onHold = true;
      }
      const atMs = now + (f.holdS ?? 0) * 1000;
      pending.push({ f, atMs, giveUpMs: Math.max(atMs, now + f.durationS * 1000 - 60 * MIN), held: maintenance });
    },
    step() {
      const now = fleet.now();
      for (let i = pending.length - 1; i >= 0; i--) {
        const p = pending[i]!;
        if (p.atMs > now) continue;
        const target = lesserPeak(p.f.serial);
        if (p.held) {
          send(p.f.serial, 'release-hold');
          refs.get(p.f.serial)!.onHold = false;
          p.held = false;
        }
        if (target) {
          send(p.f.serial, 'goto', target);
          placed++;
          pending.splice(i, 1);
        } else if (now + RETRY_MIN * MIN > p.giveUpMs) pending.splice(i, 1);
        else p.atMs = now + RETRY_MIN * MIN;
      }
    },
    counts: () => ({ scheduled, placed }),
  };
}
