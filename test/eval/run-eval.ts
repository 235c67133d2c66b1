/**
 * Offline evaluation of the health detectors: a simulated fleet with injected faults runs through the same engine the
 * server uses (no broker, no database), and the alarms are scored against the simulator's ground truth.
 *
 * Scoring (per detector kind):
 *  - an alarm matches a truth record of its kind on the same unit when the alarm's open interval overlaps the record's
 *    interval extended by `graceMin` after its end (clear delays and late reports);
 *  - precision = matching alarms / alarms of the kind; recall = eligible records matched / eligible records (a comms
 *    loss is also matched by a site-comms alarm of its site, which suppresses the units' own);
 *    delay = raise time − record start of the first matching alarm (median, minutes);
 *  - a record is eligible for recall when it lasted at least the kind's minimum observable time (`MIN_OBSERVABLE_MIN`:
 *    an alarm philosophy with a delay-on cannot, by design, raise on a shorter condition) and is not cut off by the end of
 *    the run before that time;
 *  - false alarms = alarms of any kind that overlap no truth record of any kind on their unit (site alarms: on any unit
 *    of the site), per 100 unit-days.
 *  - a hunting record counts for recall only when the unit was seen moving in daylight for the kind's minimum time, and
 *    a stall record only when its axis was commanded to move in at least a minute of it (see server/health/README.md);
 * Truth kinds: `trap` is the simulator's observed trap (`trapConditionHolds` in simulator/fleet.ts: settled below 85 % of
 * a best reachable irradiance of at least 150 W/m², no drive or sensor fault, for 10 min), not the injected "knock" that
 * may or may not trap the unit; `drift` includes dead detectors; `comms` is the injected comms loss.
 */
import { DETECTOR_TILTS_DEG } from '../../shared/demo-world';
import { DEMO_SCENARIO_BY_SITE, demoSiteInfo } from '../../simulator/demo-fleet';
import { createFleet, type FleetSiteSpec } from '../../simulator/fleet';
import type { TruthRecord } from '../../simulator/faults';
import { createRng } from '../../simulator/rng';
import { isoUtc } from '../../simulator/clock';
import type { Telemetry, UnitEvent, Weather } from '../../shared/contracts/wire';
import type { Alarm } from '../../server/health/alarm-types';
import { HealthEngine } from '../../server/health/health-engine';
import { DEFAULT_HEALTH_SETTINGS, type HealthSettings } from '../../server/health/health-settings';
import { azimuthDelta, median, type UnitRef } from '../../server/health/unit-sample';
import { wilsonInterval } from '../../shared/statistics/wilson-1927';
import type { SurveyErrorLevel } from '../../simulator/survey-error';
import { scheduleFaults, type ScheduledFault } from './fault-schedule';
import { siteModels, truthModels, type EvalModel, type EvalModelProvider } from './eval-models';
import { createRelocations } from './relocations';

export const SCORED_KINDS = ['trap', 'stall', 'drift', 'hunting', 'comms', 'soiling'] as const;
export type ScoredKind = (typeof SCORED_KINDS)[number];

const TRUTH_KIND: Record<string, ScoredKind | undefined> = {
  trap: 'trap',
  stall: 'stall',
  drift: 'drift',
  'dead-detector': 'drift',
  hunting: 'hunting',
  'comms-loss': 'comms',
  soiling: 'soiling',
};

/** Minimum duration of a truth record for it to count toward recall [min]. */
export const MIN_OBSERVABLE_MIN: Record<ScoredKind, number> = { trap: 20, stall: 15, drift: 60, hunting: 30, comms: 15, soiling: 24 * 60 };

export interface EvalOptions {
  seed: number;
  units: number;
  hours: number;
  /** No injected faults (false-alarm rate of a healthy fleet; traps the sky itself causes still count as truth). */
  faultFree?: boolean;
  /** Share of units left fault-free in a faulty run. */
  faultFreeShare?: number;
  startIso?: string;
  graceMin?: number;
  settings?: HealthSettings;
  /** Compute the full landscape analysis for trap evidence (slower). */
  evidence?: boolean;
  /** Where the detectors' site model comes from (default `truth`, the simulator's own sky). */
  model?: EvalModel;
  /** Error of the survey and station readings the `site` model is given (default `none`). */
  surveyError?: SurveyErrorLevel;
  /** Sees every telemetry report with the fleet (diagnostics). */
  observe?: (unit: UnitRef, t: Telemetry, fleet: ReturnType<typeof createFleet>) => void;
}

export interface KindScore {
  precision: number | null;
  recall: number | null;
  medianDelayMin: number | null;
  alarms: number;
  truths: number;
  eligible: number;
  /** Alarms that match a truth record (precision = matched / alarms). */
  matched: number;
  /** Eligible records found by an alarm (recall = found / eligible). */
  found: number;
  /** 95 % Wilson score intervals [low, high] of precision and recall (Wilson 1927); null without alarms / eligible records. */
  precisionCi95: [number, number] | null;
  recallCi95: [number, number] | null;
}

export interface EvalResult {
  seed: number;
  model: EvalModel;
  surveyError: SurveyErrorLevel;
  unitDays: number;
  detectors: Record<ScoredKind, KindScore>;
  falseAlarmsPer100UnitDays: number;
  falseAlarms: number;
  otherAlarms: Record<string, number>;
  injected: number;
  /** Units sent into the basin of a lesser peak of their true landscape (by a go-to, or left there after maintenance). */
  relocated: { scheduled: number; placed: number };
  faultFree: boolean;
  runtimeS: number;
}

export interface EvalRun {
  result: EvalResult;
  alarms: Alarm[];
  truth: TruthRecord[];
  schedule: ScheduledFault[];
  serialOf: Map<number, string>;
}

/**
 * The demo sites the evaluation runs on: the four scenes with cluttered skies (facades, broken cloud, courtyard, lamps).
 * The open daylight sites elsewhere in the world add no new kind of sky, so the evaluation leaves them out.
 */
export const EVAL_SITE_CODES = ['QHL', 'QED', 'FSC', 'FGA'] as const;

/** The evaluation fleet: the four demo scenes, units spread over them, detector tilts as in the demo world. */
export function evalFleetSites(units: number): FleetSiteSpec[] {
  const codes = EVAL_SITE_CODES;
  return codes
    .map((code, si) => {
      const n = Math.floor(units / codes.length) + (si < units % codes.length ? 1 : 0);
      const site = demoSiteInfo(code);
      return {
        site,
        scenario: DEMO_SCENARIO_BY_SITE[code]!,
        units: Array.from({ length: n }, (_, i) => ({
          serial: `${code}-E${String(i + 1).padStart(3, '0')}`,
          siteCode: code,
          wear: (i % 4) * 0.08,
          controller: { detectorTiltDeg: DETECTOR_TILTS_DEG[i % DETECTOR_TILTS_DEG.length]!, reportIntervalS: 5 },
          weatherStation: i === 0 && !site.indoor,
        })),
      };
    })
    .filter((s) => s.units.length > 0);
}

export function runEval(o: EvalOptions): EvalRun {
  const t0 = performance.now();
  const startMs = Date.parse(o.startIso ?? '2026-05-04T00:00:00Z');
  const endMs = startMs + o.hours * 3_600_000;
  const sites = evalFleetSites(o.units);
  const fleet = createFleet({ sites, startUnixMs: startMs }, { rng: createRng(o.seed) });
  const siteIdOf = new Map(sites.map((s, i) => [s.site.code, i + 1]));
  const refs = new Map<string, UnitRef>();
  let nextId = 1;
  for (const s of sites)
    for (const u of s.units)
      refs.set(u.serial, {
        unitId: nextId++,
        serial: u.serial,
        siteId: siteIdOf.get(s.site.code)!,
        detectorTiltDeg: u.controller!.detectorTiltDeg!,
      });
  const serialOf = new Map([...refs.values()].map((r) => [r.unitId, r.serial]));

  const evalSites = sites.map((s) => ({ siteId: siteIdOf.get(s.site.code)!, site: s.site }));
  const model = o.model ?? 'truth';
  const surveyError = o.surveyError ?? 'none';
  const provider: EvalModelProvider =
    model === 'site'
      ? siteModels({ now: () => fleet.now(), sites: evalSites, surveyError, seed: o.seed, evidence: !!o.evidence })
      : truthModels(fleet, evalSites, !!o.evidence);

  const settings = o.settings ?? DEFAULT_HEALTH_SETTINGS;
  const engine = new HealthEngine({ now: () => fleet.now(), models: provider, settingsFor: () => settings });
  const schedule = o.faultFree
    ? []
    : scheduleFaults({
        units: sites.flatMap((s) => s.units.map((u) => ({ serial: u.serial, site: s.site }))),
        startMs,
        endMs,
        rng: createRng(`eval-faults:${o.seed}`),
        faultFreeShare: o.faultFreeShare ?? 0.25,
      });
  const relocations = createRelocations(fleet, refs);
  let next = 0;
  const stepS = 5;
  const injectedKeys = new Set<string>();
  // What each unit's reports made observable, per minute: whether it was moving in daylight at its site (the product's
  // production gate), and whether each axis was commanded away from where it stood.
  const seen = new Map<string, UnitObservability>();
  const stallAxis = new Map<string, 'tilt' | 'azimuth'>();
  while (fleet.now() < endMs) {
    while (next < schedule.length && schedule[next]!.startMs <= fleet.now()) {
      const f = schedule[next++]!;
      if (f.kind === 'lesser-peak') {
        relocations.add(f);
        continue;
      }
      fleet.injectFault(f.serial, f.kind, f.durationS, f.target);
      injectedKeys.add(`${f.serial}|${f.kind}|${isoUtc(fleet.now())}`);
      if (f.kind === 'stall') stallAxis.set(`${f.serial}|${isoUtc(fleet.now())}`, f.target % 2 === 0 ? 'tilt' : 'azimuth');
    }
    relocations.step();
    const msgs = fleet.step(stepS);
    for (const m of msgs) {
      const ref = refs.get(m.serial)!;
      if (m.leaf === 'telemetry') {
        const t = m.payload as Telemetry;
        const atMs = Date.parse(t.ts);
        const minute = Math.floor(atMs / 60_000);
        let ob = seen.get(ref.serial);
        if (!ob) seen.set(ref.serial, (ob = { movingInDaylight: new Set(), tiltDriven: new Set(), azimuthDriven: new Set() }));
        const moved = ob.prev
          ? Math.hypot(
              t.tiltDeg - ob.prev.tiltDeg,
              azimuthDelta(ob.prev.azimuthDeg, t.azimuthDeg) * Math.sin((t.tiltDeg * Math.PI) / 180),
            ) >= MOVED_DEG
          : false;
        ob.prev = { tiltDeg: t.tiltDeg, azimuthDeg: t.azimuthDeg };
        if (moved && HealthEngine.daylight(provider.siteModel(ref.siteId, atMs), settings)) ob.movingInDaylight.add(minute);
        if (Math.abs(t.cmdTiltDeg - t.tiltDeg) >= DRIVEN_DEG) ob.tiltDriven.add(minute);
        if (Math.abs(t.cmdAzimuthDeg - t.azimuthDeg) >= DRIVEN_DEG) ob.azimuthDriven.add(minute);
        engine.telemetry(ref, t);
        o.observe?.(ref, m.payload as Telemetry, fleet);
      } else if (m.leaf === 'events') engine.event(ref, m.payload as UnitEvent);
      else if (m.leaf === 'weather') {
        provider.weather(ref.siteId, m.payload as Weather);
        engine.weather(ref.siteId, m.payload as Weather, ref);
      }
    }
    engine.tick();
  }
  const alarms = engine.book.all();
  const truth = fleet.truth();
  const result = score({
    alarms,
    truth,
    injectedKeys,
    seen,
    stallAxis,
    serialOf,
    refs: [...refs.values()],
    startMs,
    endMs,
    graceMin: o.graceMin ?? 30,
    units: refs.size,
    hours: o.hours,
  });
  result.seed = o.seed;
  result.model = model;
  result.surveyError = surveyError;
  result.injected = schedule.length;
  result.relocated = relocations.counts();
  result.faultFree = !!o.faultFree;
  result.runtimeS = Math.round((performance.now() - t0) / 100) / 10;
  return { result, alarms, truth, schedule, serialOf };
}

/** Minutes (since the epoch) in which a unit was seen moving in daylight at its site, or an axis commanded to move. */
export interface UnitObservability {
  prev?: { tiltDeg: number; azimuthDeg: number };
  movingInDaylight: Set<number>;
  tiltDriven: Set<number>;
  azimuthDriven: Set<number>;
}

/** Motion of the panel normal between two reports from which a unit counts as seen moving [°]. */
const MOVED_DEG = 0.5;
/** Commanded minus measured angle from which an axis counts as asked to move [°]. */
const DRIVEN_DEG = 0.1;
/** A stall is observable once its axis has been asked to move in at least this many minutes of the record. */
const STALL_DRIVEN_MIN = 1;

interface ScoreInput {
  alarms: Alarm[];
  /** Per serial (absent: everything counts as observable). */
  seen?: Map<string, UnitObservability>;
  /** Stalled axis per `serial|start` of an injected stall. */
  stallAxis?: Map<string, 'tilt' | 'azimuth'>;
  truth: TruthRecord[];
  /** serial|kind|start of injected records (to tell an injected trap "knock" from an observed trap). */
  injectedKeys: Set<string>;
  serialOf: Map<number, string>;
  refs: UnitRef[];
  startMs: number;
  endMs: number;
  graceMin: number;
  units: number;
  hours: number;
}

export function score(i: ScoreInput): EvalResult {
  const graceMs = i.graceMin * 60_000;
  const truth = i.truth
    .filter((r) => r.fault !== 'wind-stow')
    .map((r) => {
      const injected = i.injectedKeys.has(`${r.serial}|${r.fault}|${r.start}`);
      const kind = r.fault === 'trap' && injected ? undefined : TRUTH_KIND[r.fault];
      return { serial: r.serial, fault: r.fault, kind, startMs: Date.parse(r.start), endMs: r.end ? Date.parse(r.end) : i.endMs };
    });
  const alarmEnd = (a: Alarm) => a.clearedMs ?? i.endMs;
  const overlaps = (a: Alarm, t: { startMs: number; endMs: number }) => a.raisedMs <= t.endMs + graceMs && alarmEnd(a) >= t.startMs;
  const siteSerials = new Map<number, Set<string>>();
  for (const r of i.refs) {
    let s = siteSerials.get(r.siteId);
    if (!s) siteSerials.set(r.siteId, (s = new Set()));
    s.add(r.serial);
  }
  const siteDark = i.alarms.filter((a) => a.kind === 'site-comms');
  const detectors = {} as Record<ScoredKind, KindScore>;
  for (const kind of SCORED_KINDS) {
    const as = i.alarms.filter((a) => a.kind === kind);
    const ts = truth.filter((t) => t.kind === kind);
    const tp = as.filter((a) => ts.some((t) => t.serial === a.serial && overlaps(a, t))).length;
    const minMs = MIN_OBSERVABLE_MIN[kind] * 60_000;
    const minutesIn = (set: Set<number> | undefined, t: { startMs: number; endMs: number }) => {
      if (!set) return Infinity;
      let n = 0;
      for (let m = Math.floor(t.startMs / 60_000); m < t.endMs / 60_000; m++) if (set.has(m)) n++;
      return n;
    };
    const observable = (t: (typeof truth)[number]) => {
      const o = i.seen?.get(t.serial);
      if (!o) return true;
      if (kind === 'hunting') return minutesIn(o.movingInDaylight, t) >= MIN_OBSERVABLE_MIN.hunting;
      if (kind === 'stall') {
        const axis = i.stallAxis?.get(`${t.serial}|${isoUtc(t.startMs)}`);
        if (!axis) return true;
        return minutesIn(axis === 'tilt' ? o.tiltDriven : o.azimuthDriven, t) >= STALL_DRIVEN_MIN;
      }
      return true;
    };
    const eligible = ts.filter((t) => t.endMs - t.startMs >= minMs && t.startMs + minMs <= i.endMs && observable(t));
    const delays: number[] = [];
    let found = 0;
    for (const t of eligible) {
      // A comms loss while the whole site is dark is reported by the one site alarm, which suppresses the units' own.
      const hits = [...as, ...(kind === 'comms' ? siteDark : [])].filter(
        (a) => (a.serial === t.serial || (a.serial === null && siteSerials.get(a.siteId)?.has(t.serial))) && overlaps(a, t),
      );
      if (hits.length) {
        found++;
        delays.push((Math.min(...hits.map((a) => a.raisedMs)) - t.startMs) / 60_000);
      }
    }
    detectors[kind] = {
      precision: as.length ? round3(tp / as.length) : null,
      recall: eligible.length ? round3(found / eligible.length) : null,
      medianDelayMin: delays.length ? Math.round(median(delays) * 10) / 10 : null,
      alarms: as.length,
      truths: ts.length,
      eligible: eligible.length,
      matched: tp,
      found,
      precisionCi95: ci95(tp, as.length),
      recallCi95: ci95(found, eligible.length),
    };
  }
  const isFalse = (a: Alarm) => {
    const serials = a.serial ? new Set([a.serial]) : (siteSerials.get(a.siteId) ?? new Set<string>());
    return !truth.some((t) => serials.has(t.serial) && overlaps(a, t));
  };
  const falseAlarms = i.alarms.filter(isFalse).length;
  const unitDays = (i.units * i.hours) / 24;
  const otherAlarms: Record<string, number> = {};
  for (const a of i.alarms) if (!(SCORED_KINDS as readonly string[]).includes(a.kind)) otherAlarms[a.kind] = (otherAlarms[a.kind] ?? 0) + 1;
  return {
    seed: 0,
    model: 'truth',
    surveyError: 'none',
    unitDays: round3(unitDays),
    detectors,
    falseAlarmsPer100UnitDays: round3((falseAlarms / unitDays) * 100),
    falseAlarms,
    otherAlarms,
    injected: 0,
    relocated: { scheduled: 0, placed: 0 },
    faultFree: false,
    runtimeS: 0,
  };
}

const round3 = (x: number) => Math.round(x * 1000) / 1000;
const ci95 = (k: number, n: number): [number, number] | null => {
  const w = wilsonInterval(k, n);
  return w ? [round3(w.low), round3(w.high)] : null;
};
