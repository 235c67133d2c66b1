/**
 * A fleet of virtual units on their sites: pure and steppable, no I/O. `createFleet(spec, { rng })`, then `step(dtS)` (or
 * `advanceTo(unixMs)`) returns the messages units whose link is up send in that time, backlog first. Commands go in with
 * `command()`, the transport state with `setTransport()`. Ground truth (injected faults and observed traps and wind stows)
 * and baseline energies are available in memory; the CLI writes them to files.
 */
import { MODULE_POWER_TEMP_COEFF_PER_K as TEMP_COEFF_PER_K } from '../shared/contracts/pv-module';
import type { Command } from '../shared/contracts/wire';
import { bestReachableOrientationWith, STANDARD_UNIT_LIMITS, TRAP_RATIO, type BestOrientation, type UnitLimits } from '../shared/landscape';
import { isoUtc } from './clock';
import {
  FAULT_KINDS,
  FAULT_MEAN_HOURS,
  type ActiveFault,
  type FaultKind,
  type FaultPlan,
  type TruthKind,
  type TruthRecord,
} from './faults';
import type { Rng } from './rng';
import { createScenarioWorld, type SiteConditions, type SiteInfo, type SiteWorld } from './scenarios';
import { irradianceTiltAz, normalFromTiltAzimuth, type SkyField } from './sky-field';
import { VirtualUnit, type OutboundMessage, type UnitSpec } from './unit-model';

export interface FleetSiteSpec {
  site: SiteInfo;
  scenario: string;
  units: UnitSpec[];
  /** A ready-made world instead of the named scenario (tests: a frozen sky). */
  world?: SiteWorld;
}

export interface FleetSpec {
  sites: FleetSiteSpec[];
  startUnixMs: number;
  faults?: FaultPlan;
  /** Longest internal step [s]; default 1. */
  maxStepS?: number;
  /** Sky rebuild interval [s]; default 60. */
  skyRefreshS?: number;
}

/** Energy of a unit and of its two twins under the same sky since the start of the run. */
export interface BaselineEnergy {
  serial: string;
  siteCode: string;
  /** Plane-of-array irradiation [Wh/m²]. */
  unitPoaWhm2: number;
  fixedTiltPoaWhm2: number;
  sunFollowingPoaWhm2: number;
  /** DC energy [Wh] (twins: same module and temperature model, clean). */
  unitDcWh: number;
  fixedTiltDcWh: number;
  sunFollowingDcWh: number;
}

export interface Fleet {
  readonly units: readonly VirtualUnit[];
  unit(serial: string): VirtualUnit | undefined;
  now(): number;
  /** Advances simulated time by dt seconds; returns the messages that left the units. */
  step(dtS: number): OutboundMessage[];
  /** Advances to an instant (no-op when it is not later than now). */
  advanceTo(unixMs: number): OutboundMessage[];
  /** Delivers a command to a unit (as if it arrived on its commands topic). */
  command(serial: string, cmd: Command): void;
  /** Tells the fleet whether a unit's transport is connected. */
  setTransport(serial: string, up: boolean): void;
  /** Every truth record so far (open ones with end null). */
  truth(): TruthRecord[];
  baselines(): BaselineEnergy[];
  /** Latest conditions at a site. */
  conditions(siteCode: string): SiteConditions | undefined;
  /** Best orientation a unit with these limits (default: a standard unit's) can reach under a sky field (shared/landscape). */
  bestReachable(field: SkyField, limits?: UnitLimits): BestOrientation;
  /** Starts an injected fault now (tests, scripted runs). */
  injectFault(serial: string, kind: FaultKind, durationS: number, target?: number): void;
}

/** A settled unit below `TRAP_RATIO` (shared/landscape) of its best reachable irradiance, with nothing else wrong, counts as trapped. */
export { TRAP_RATIO };
/** …while the best reachable orientation gets at least this [W/m²]: below it (dusk, dim lamps) a trap is not counted. */
export const TRAP_MIN_BEST_WM2 = 150;

/**
 * Faults that change where a unit balances or whether it can move at all (a drive or sensor fault); a unit with one of
 * these is not counted as trapped. Comms loss, soiling and hunting (a gain fault: once the unit has come to rest it sits
 * on a local maximum of the true landscape like any other) do not exclude a trap.
 */
export const BALANCE_FAULTS: ReadonlySet<FaultKind> = new Set<FaultKind>(['stall', 'slip', 'drift', 'dead-detector', 'stuck-mode']);

/**
 * The one definition of "trapped" used for ground truth: settled (no net motion beyond 1° for the settle time), no
 * `BALANCE_FAULTS` fault, the best reachable orientation at
 * least `TRAP_MIN_BEST_WM2`, and the unit's true in-plane irradiance below `TRAP_RATIO` of it. It must hold for 10 min to
 * open a record and be absent for 2 min to close it.
 */
export function trapConditionHolds(x: { settled: boolean; otherFault: boolean; poaWm2: number; bestWm2: number }): boolean {
  return x.settled && !x.otherFault && x.bestWm2 >= TRAP_MIN_BEST_WM2 && x.poaWm2 < TRAP_RATIO * x.bestWm2;
}
const TRAP_OPEN_S = 600;
const TRAP_CLOSE_S = 120;
const NOCT_RISE_K_PER_WM2 = 25 / 800;

interface SiteRun {
  spec: FleetSiteSpec;
  world: SiteWorld;
  units: VirtualUnit[];
  last?: SiteConditions;
  fixedPoaWhm2: number;
  sunPoaWhm2: number;
  /** DC per rated watt [Wh/Wp]. */
  fixedDcPerWp: number;
  sunDcPerWp: number;
}

interface Observer {
  candidateSinceMs: number | null;
  clearSinceMs: number | null;
  open: TruthRecord | null;
}

/** Best reachable orientation per sky field and unit limits (shared/landscape's one definition), cached per field. */
function bestReachableSearch(): (field: SkyField, limits?: UnitLimits) => BestOrientation {
  const bestCache = new WeakMap<SkyField, Map<string, BestOrientation>>();
  const keys = new WeakMap<UnitLimits, string>();
  return (field, limits = STANDARD_UNIT_LIMITS) => {
    let key = keys.get(limits);
    if (key === undefined) keys.set(limits, (key = `${limits.tiltRangeDeg.join(',')}|${limits.azimuthRangeDeg.join(',')}`));
    let perField = bestCache.get(field);
    if (!perField) bestCache.set(field, (perField = new Map()));
    let best = perField.get(key);
    if (!best) {
      best = bestReachableOrientationWith((n) => field.irradiance(n), limits);
      perField.set(key, best);
    }
    return best;
  };
}

/** A unit's travel as unit limits. */
function limitsOf(u: VirtualUnit): UnitLimits {
  return { tiltRangeDeg: [u.tiltSpec.minDeg, u.tiltSpec.maxDeg], azimuthRangeDeg: [u.azimuthSpec.minDeg, u.azimuthSpec.maxDeg] };
}

/** The sites with their worlds and units, random streams forked in site order. */
function createSiteRuns(spec: FleetSpec, rng: Rng): SiteRun[] {
  return spec.sites.map((s) => ({
    spec: s,
    world: s.world ?? createScenarioWorld(s.scenario, s.site, rng, { skyRefreshS: spec.skyRefreshS }),
    units: s.units.map((u) => new VirtualUnit(u, rng.fork(`unit:${u.serial}`), spec.startUnixMs)),
    fixedPoaWhm2: 0,
    sunPoaWhm2: 0,
    fixedDcPerWp: 0,
    sunDcPerWp: 0,
  }));
}

/**
 * Advances one unit's trap observer: a record opens once the trap condition has held for `TRAP_OPEN_S` (starting when it
 * began) and closes once it has been absent for `TRAP_CLOSE_S` (ending when it went away). Returns a closed record.
 */
function observeTrap(o: Observer, holds: boolean, serial: string, nowMs: number): TruthRecord | null {
  if (holds) {
    o.clearSinceMs = null;
    if (o.candidateSinceMs === null) o.candidateSinceMs = nowMs;
    if (!o.open && nowMs - o.candidateSinceMs >= TRAP_OPEN_S * 1000)
      o.open = { serial, fault: 'trap', start: isoUtc(o.candidateSinceMs), end: null };
    return null;
  }
  o.candidateSinceMs = null;
  if (!o.open) return null;
  if (o.clearSinceMs === null) o.clearSinceMs = nowMs;
  if (nowMs - o.clearSinceMs < TRAP_CLOSE_S * 1000) return null;
  const done = o.open;
  done.end = isoUtc(o.clearSinceMs);
  o.open = null;
  o.clearSinceMs = null;
  return done;
}

/** Adds dt seconds of the site's two twins (fixed tilt facing the equator, sun-following within 85°) to its baselines. */
function accumulateTwins(s: SiteRun, c: SiteConditions, dtS: number): void {
  const lat = s.spec.site.latitudeDeg;
  const fixed = irradianceTiltAz(c.field, Math.abs(lat), lat >= 0 ? 180 : 0);
  const sun = c.sunDir
    ? c.field.irradiance(c.sunDir[2] >= Math.cos((85 * Math.PI) / 180) ? c.sunDir : normalFromTiltAzimuth(85, c.sunAzimuthDeg))
    : irradianceTiltAz(c.field, 0, 0);
  const dc = (e: number) => (e / 1000) * (1 + TEMP_COEFF_PER_K * (c.weather.airTempC + e * NOCT_RISE_K_PER_WM2 - 25));
  s.fixedPoaWhm2 += (fixed * dtS) / 3600;
  s.sunPoaWhm2 += (sun * dtS) / 3600;
  s.fixedDcPerWp += (Math.max(0, dc(fixed)) * dtS) / 3600;
  s.sunDcPerWp += (Math.max(0, dc(sun)) * dtS) / 3600;
}

function baselinesOf(sites: readonly SiteRun[]): BaselineEnergy[] {
  return sites.flatMap((s) =>
    s.units.map((u) => ({
      serial: u.serial,
      siteCode: s.spec.site.code,
      unitPoaWhm2: u.energy.poaWhm2,
      fixedTiltPoaWhm2: s.fixedPoaWhm2,
      sunFollowingPoaWhm2: s.sunPoaWhm2,
      unitDcWh: u.energy.dcWh,
      fixedTiltDcWh: s.fixedDcPerWp * u.ratedPowerWp,
      sunFollowingDcWh: s.sunDcPerWp * u.ratedPowerWp,
    })),
  );
}

/** Ground truth as it accrues: injected faults while active, observed traps and wind stows, and the closed records. */
class TruthBook {
  private readonly closed: TruthRecord[] = [];
  private readonly openFaults = new Map<ActiveFault, { unit: VirtualUnit; record: TruthRecord }>();
  private readonly trapObs = new Map<VirtualUnit, Observer>();
  private readonly windOpen = new Map<VirtualUnit, TruthRecord>();

  constructor(units: readonly VirtualUnit[]) {
    for (const u of units) this.trapObs.set(u, { candidateSinceMs: null, clearSinceMs: null, open: null });
  }

  faultStarted(u: VirtualUnit, f: ActiveFault, nowMs: number): void {
    this.openFaults.set(f, { unit: u, record: { serial: u.serial, fault: f.kind, start: isoUtc(nowMs), end: null } });
  }

  /** Ends the injected faults that are due (the unit recovers) and closes their records. */
  endDueFaults(nowMs: number): void {
    for (const [f, { unit, record }] of this.openFaults) {
      if (f.endMs <= nowMs) {
        unit.endFault(f, nowMs);
        record.end = isoUtc(nowMs);
        this.closed.push(record);
        this.openFaults.delete(f);
      }
    }
  }

  windStow(u: VirtualUnit, nowMs: number): void {
    const w = this.windOpen.get(u);
    if (u.windStow && !w) this.windOpen.set(u, { serial: u.serial, fault: 'wind-stow', start: isoUtc(nowMs), end: null });
    if (!u.windStow && w) {
      w.end = isoUtc(nowMs);
      this.closed.push(w);
      this.windOpen.delete(u);
    }
  }

  trap(u: VirtualUnit, holds: boolean, nowMs: number): void {
    const done = observeTrap(this.trapObs.get(u)!, holds, u.serial, nowMs);
    if (done) this.closed.push(done);
  }

  /** Every record so far, closed first; open ones are copies with end null. */
  all(): TruthRecord[] {
    const open: TruthRecord[] = [
      ...[...this.openFaults.values()].map((x) => x.record),
      ...[...this.trapObs.values()].flatMap((o) => (o.open ? [o.open] : [])),
      ...this.windOpen.values(),
    ];
    return [...this.closed, ...open.map((r) => ({ ...r }))];
  }
}

export function createFleet(spec: FleetSpec, deps: { rng: Rng }): Fleet {
  const rng = deps.rng;
  let now = spec.startUnixMs;
  const maxStep = spec.maxStepS ?? 1;
  const sites = createSiteRuns(spec, rng);
  const units = sites.flatMap((s) => s.units);
  const bySerial = new Map(units.map((u) => [u.serial, u]));
  const faultRng = rng.fork('faults');
  const plan = Object.entries(spec.faults ?? {}).filter(([, r]) => (r ?? 0) > 0) as [FaultKind, number][];
  const book = new TruthBook(units);
  const bestReachable = bestReachableSearch();
  const limits = new Map(units.map((u) => [u, limitsOf(u)]));

  function startFault(u: VirtualUnit, kind: FaultKind, durationS: number, target: number) {
    const f: ActiveFault = { kind, startMs: now, endMs: now + durationS * 1000, target };
    u.startFault(f, now);
    book.faultStarted(u, f, now);
  }

  function startPlannedFaults(dtS: number) {
    for (const u of units)
      for (const [kind, rate] of plan) {
        if (!u.hasFault(kind) && faultRng.chance((rate * dtS) / 86_400)) {
          const dur = Math.max(300, faultRng.exponential(FAULT_MEAN_HOURS[kind] * 3600));
          startFault(u, kind, dur, Math.floor(faultRng.next() * 4));
        }
      }
  }

  /** Observed truth: wind stows, and traps (settled well below the best reachable orientation, nothing else wrong). */
  function observe(u: VirtualUnit, c: SiteConditions) {
    book.windStow(u, now);
    const best = bestReachable(c.field, limits.get(u));
    const otherFault = u.faults.some((f) => BALANCE_FAULTS.has(f.kind));
    const holds = trapConditionHolds({ settled: u.mode === 'settled', otherFault, poaWm2: u.last?.truePoaWm2 ?? 0, bestWm2: best.wm2 });
    book.trap(u, holds, now);
  }

  function drain(): OutboundMessage[] {
    const out: OutboundMessage[] = [];
    for (const u of units) if (u.linkUp && u.outbox.size > 0) for (const m of u.outbox.drain()) out.push(m);
    return out;
  }

  function substep(dtS: number) {
    now += dtS * 1000;
    // Faults end, then new ones may start.
    book.endDueFaults(now);
    if (plan.length) startPlannedFaults(dtS);
    for (const s of sites) {
      const c = s.world.at(now, dtS);
      s.last = c;
      accumulateTwins(s, c, dtS);
      for (const u of s.units) {
        u.step(c, dtS);
        observe(u, c);
      }
    }
  }

  const fleet: Fleet = {
    units,
    unit: (serial) => bySerial.get(serial),
    now: () => now,
    step(dtS) {
      let left = dtS;
      while (left > 1e-9) {
        const d = Math.min(maxStep, left);
        substep(d);
        left -= d;
      }
      return drain();
    },
    advanceTo(unixMs) {
      const dt = (unixMs - now) / 1000;
      return dt > 0 ? fleet.step(dt) : drain();
    },
    command(serial, cmd) {
      const u = bySerial.get(serial);
      if (u) u.handleCommand(cmd, now);
    },
    setTransport(serial, up) {
      const u = bySerial.get(serial);
      if (u) u.transportUp = up;
    },
    truth: () => book.all(),
    baselines: () => baselinesOf(sites),
    conditions: (code) => sites.find((s) => s.spec.site.code === code)?.last,
    bestReachable,
    injectFault(serial, kind, durationS, target = 0) {
      const u = bySerial.get(serial);
      if (!u) throw new RangeError(`no unit ${serial}`);
      if (!(FAULT_KINDS as readonly string[]).includes(kind)) throw new RangeError(`unknown fault ${kind}`);
      startFault(u, kind, durationS, target);
    },
  };
  return fleet;
}

export type { TruthKind };
