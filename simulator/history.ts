/**
 * The demo's past, made by the simulator's own models (pure, no I/O; `history-cli.ts` streams it to whoever stores it).
 *
 *  - Full rate: `fullRateHistory` runs the live fleet model (`createFleet`, the same units, scenarios and faults) over a
 *    window, after a short warm-up so units are settled where the window starts. Every message a unit sends in the window
 *    (telemetry, events, weather) comes out with the instant it left the unit; the truth records (injected faults,
 *    observed traps and wind stows) that start in the window come back at the end.
 *  - Rollup level: `rollupModelHistory` gives, per unit and 15-minute interval, what the unit's rollup would hold: the
 *    site's sky from the same scenario world on template days, the unit settled at its best reachable orientation
 *    (shared/landscape), the module temperature model the fleet's twins use, and faults of the same kinds, rates and
 *    durations as downtime (missing minutes) or a loss. See simulator/README.md, "History", for the model and its limits.
 * Both are deterministic: the same sites, seed and window give the same output.
 */
import { MODULE_POWER_TEMP_COEFF_PER_K as TEMP_COEFF_PER_K } from '../shared/contracts/pv-module';
import { bestReachableOrientationWith, type UnitLimits } from '../shared/landscape';
import { fixedTwinOrientation, sunTwinOrientation } from '../shared/pv-performance/mount-twins';
import { normalFromTiltAzimuth } from '../shared/sphere/directions';
import { solarPosition } from '../shared/solar-position';
import { isoUtc } from './clock';
import { FAULT_MEAN_HOURS, type FaultKind, type FaultPlan, type TruthRecord } from './faults';
import { createFleet, type FleetSiteSpec } from './fleet';
import { createRng, type Rng } from './rng';
import { createScenarioWorld, SCENARIOS } from './scenarios';
import { airTemperatureC } from './scenarios/weather';
import type { OutboundMessage } from './unit-model';

const MINUTE_MS = 60_000;
const QUARTER_MS = 15 * MINUTE_MS;
const DAY_MS = 86_400_000;
/** Module temperature rise over air per W/m² (NOCT-style, as the fleet's twins). */
const NOCT_RISE_K_PER_WM2 = 25 / 800;

/**
 * Faults of the demo's past (expected occurrences per unit per day): a few of each kind the detectors watch, so the past
 * has cleared alarms to look at. The live demo runs without injected faults.
 */
export const HISTORY_FAULTS: FaultPlan = { stall: 0.02, drift: 0.01, hunting: 0.02, 'comms-loss': 0.05, soiling: 0.005 };
/** Trap episodes per day on units whose detector tilt is narrower than `TRAP_PRONE_TILT_DEG` (rollup level only: at full rate traps happen by themselves). */
export const MODEL_TRAPS_PER_DAY = 0.3;
export const TRAP_PRONE_TILT_DEG = 12;
/** Share of the best reachable irradiance a unit gets while a fault of each kind is on (rollup level); absent kinds: 1. */
export const MODEL_FAULT_FACTOR: Partial<Record<FaultKind, number>> = {
  trap: 0.7,
  drift: 0.9,
  hunting: 0.9,
  soiling: 0.9,
  'dead-detector': 0.8,
};
/** Kinds whose time counts as missing minutes at the rollup level (the unit produced nothing it could report). */
export const MODEL_DOWNTIME_KINDS: ReadonlySet<FaultKind> = new Set<FaultKind>(['stall', 'comms-loss']);

export interface FullRateWindow {
  fromMs: number;
  toMs: number;
  seed: string;
  faults?: FaultPlan;
  /** Simulated before `fromMs` and thrown away, so units start the window settled [s]; default 1800 (300 for windows under an hour). */
  warmupS?: number;
  /** Messages are handed over in batches of this much simulated time [s]; default 900. */
  batchS?: number;
}

/** A message and when it left the unit (the store time of a resend is when its link came back) [ms]. */
export interface TimedMessage {
  message: OutboundMessage;
  sentMs: number;
}

const tsOf = (m: OutboundMessage): number => Date.parse(m.payload.ts);

/**
 * Runs the fleet model over [fromMs, toMs) and hands over every message stamped in the window, batch by batch. Returns the
 * truth records that started in the window (open ones closed at `toMs`: the window's end is where the record stops).
 */
export function fullRateHistory(sites: FleetSiteSpec[], w: FullRateWindow, onBatch: (batch: TimedMessage[]) => void): TruthRecord[] {
  if (!(w.fromMs < w.toMs)) throw new RangeError(`empty history window ${isoUtc(w.fromMs)} … ${isoUtc(w.toMs)}`);
  const warmupMs = (w.warmupS ?? (w.toMs - w.fromMs < 3_600_000 ? 300 : 1800)) * 1000;
  // Started on a whole minute, so every window's reports fall on the same grid and adjoining windows join without a
  // doubled report interval at the seam.
  const startMs = Math.floor((w.fromMs - warmupMs) / MINUTE_MS) * MINUTE_MS;
  const fleet = createFleet({ sites, startUnixMs: startMs, faults: w.faults ?? {} }, { rng: createRng(`${w.seed}|full|${w.fromMs}`) });
  // Whole seconds only, so the grid stays on whole seconds when the window starts between two.
  fleet.advanceTo(startMs + Math.ceil((w.fromMs - startMs) / 1000) * 1000);
  const batchMs = (w.batchS ?? 900) * 1000;
  const keep = (m: OutboundMessage) => m.leaf !== 'acks' && tsOf(m) >= w.fromMs && tsOf(m) < w.toMs;
  while (fleet.now() < w.toMs) {
    const msgs = fleet.advanceTo(Math.min(w.toMs, fleet.now() + batchMs));
    const sentMs = fleet.now();
    onBatch(msgs.filter(keep).map((message) => ({ message, sentMs })));
  }
  // Whatever is still buffered (a link down at the end) is forwarded when the link returns: hand it over now.
  const left: TimedMessage[] = [];
  for (const u of fleet.units) for (const message of u.outbox.drain()) if (keep(message)) left.push({ message, sentMs: w.toMs });
  if (left.length) onBatch(left);
  const end = isoUtc(w.toMs);
  return fleet
    .truth()
    .filter((r) => Date.parse(r.start) >= w.fromMs && Date.parse(r.start) < w.toMs)
    .map((r) => ({ ...r, end: r.end === null || Date.parse(r.end) > w.toMs ? end : r.end }));
}

/** One unit's 15-minute interval as its rollup would hold it (the columns of a 15-minute rollup). */
export interface ModelQuarter {
  serial: string;
  bucketMs: number;
  /** Minutes with reports (15 less downtime). */
  minutes: number;
  samples: number;
  poaAvgWm2: number;
  poaMaxWm2: number;
  dcPowerAvgW: number;
  energyWh: number;
  /** Mean module temperature [°C]. */
  moduleTempC: number;
  /** Mean orientation [°]: the best reachable one, flat (tilt 0) in wind stow. */
  tiltDeg: number;
  azimuthDeg: number;
  /** Minutes per mode over the reported minutes (seeking while hunting, stowed in wind stow, settled otherwise). */
  seekingMin: number;
  settledMin: number;
  stowedMin: number;
  /**
   * Modelled in-plane irradiance [W/m²] under the generator's own sky (so the model has no bias here): at the unit's
   * orientation (its share of the best under a trap, drift, hunting or a dead detector; the horizontal value in stow),
   * at the best reachable orientation, on the fixed-tilt and sun-following twins (shared/pv-performance/mount-twins.ts).
   */
  modelUnitWm2: number;
  modelBestWm2: number;
  modelFixedWm2: number;
  modelSunWm2: number;
}

/** The site weather station's reading at an interval's midpoint (`serial`: the unit that carries the station). */
export interface ModelWeather {
  serial: string;
  tsMs: number;
  ghiWm2: number;
  dhiWm2: number;
  airTempC: number;
  windMs: number;
  gustMs: number;
}

export interface RollupModelWindow {
  /** Rounded down and up to whole 15-minute intervals. */
  fromMs: number;
  toMs: number;
  seed: string;
  faults?: FaultPlan;
  /** Days between template days (the full sky is built on these; days between are interpolated); default 28. */
  templateDays?: number;
}

/** What a unit travel gets under one slot's sky: best reachable orientation and irradiance, sun-following twin [°, W/m²]. */
interface TravelSky {
  wm2: number;
  tiltDeg: number;
  azimuthDeg: number;
  sunWm2: number;
}

interface SlotSky {
  /** Per unit-limits key. */
  best: Map<string, TravelSky>;
  /** Fixed-tilt twin of the site [W/m²]. */
  fixedWm2: number;
  ghiWm2: number;
  dhiWm2: number;
  airTempC: number;
  windMs: number;
  gustMs: number;
}

const limitsKey = (l: UnitLimits) => `${l.tiltRangeDeg.join(',')}|${l.azimuthRangeDeg.join(',')}`;

function unitLimits(u: FleetSiteSpec['units'][number]): UnitLimits {
  return {
    tiltRangeDeg: [u.tilt?.minDeg ?? 0, u.tilt?.maxDeg ?? 85],
    azimuthRangeDeg: [u.azimuth?.minDeg ?? 0, u.azimuth?.maxDeg ?? 360],
  };
}

/**
 * The sky of a site at each 15-minute slot of its template days: the scenario world sampled at every other slot's
 * midpoint (its processes advanced one minute per sample, so cloud and wind states are drawn from the same processes),
 * the slot between two samples their mean; the best reachable irradiance per distinct unit travel. Night samples outdoors
 * need no sky: zero irradiance, the scenario's air temperature cycle and mean wind.
 */
function templateSkies(site: FleetSiteSpec, days: number[], rng: Rng): SlotSky[][] {
  const world = createScenarioWorld(site.scenario, site.site, rng);
  const parts = SCENARIOS[site.scenario]!.parts(site.site);
  const limits = new Map(site.units.map((u) => [limitsKey(unitLimits(u)), unitLimits(u)]));
  const loc = { latitudeDeg: site.site.latitudeDeg, longitudeDeg: site.site.longitudeDeg, elevationM: site.site.elevationM };
  const fixed = fixedTwinOrientation(site.site.latitudeDeg);
  const fixedNormal = normalFromTiltAzimuth(fixed.tiltDeg, fixed.azimuthDeg);
  const sample = (t: number): SlotSky => {
    const best = new Map<string, TravelSky>();
    if (!site.site.indoor && solarPosition(loc, t).elevationDeg <= -1) {
      // At night a unit rests where the search over a dark sky ends (its lower limits).
      for (const [key, l] of limits)
        best.set(key, { wm2: 0, tiltDeg: l.tiltRangeDeg[0], azimuthDeg: l.azimuthRangeDeg[0] % 360, sunWm2: 0 });
      const airTempC = airTemperatureC(parts.airTemp.meanC, parts.airTemp.amplitudeC, site.site.longitudeDeg, t);
      return { best, fixedWm2: 0, ghiWm2: 0, dhiWm2: 0, airTempC, windMs: parts.wind.meanMs, gustMs: parts.wind.meanMs * 1.4 };
    }
    const c = world.at(t, 60);
    const e = (n: Parameters<typeof c.field.irradiance>[0]) => c.field.irradiance(n);
    for (const [key, l] of limits) {
      const b = bestReachableOrientationWith(e, l);
      const sun = sunTwinOrientation(c.field.sky, l);
      best.set(key, {
        wm2: b.wm2,
        tiltDeg: b.tiltDeg,
        azimuthDeg: b.azimuthDeg,
        sunWm2: e(normalFromTiltAzimuth(sun.tiltDeg, sun.azimuthDeg)),
      });
    }
    return { best, fixedWm2: e(fixedNormal), ...c.weather };
  };
  const mean = (a: SlotSky, b: SlotSky): SlotSky => ({
    best: new Map([...a.best].map(([k, v]) => [k, meanTravel(v, b.best.get(k)!, 0.5)])),
    fixedWm2: (a.fixedWm2 + b.fixedWm2) / 2,
    ghiWm2: (a.ghiWm2 + b.ghiWm2) / 2,
    dhiWm2: (a.dhiWm2 + b.dhiWm2) / 2,
    airTempC: (a.airTempC + b.airTempC) / 2,
    windMs: (a.windMs + b.windMs) / 2,
    gustMs: (a.gustMs + b.gustMs) / 2,
  });
  return days.map((dayMs) => {
    const samples = Array.from({ length: 48 }, (_, i) => sample(dayMs + 2 * i * QUARTER_MS + QUARTER_MS / 2));
    return Array.from({ length: 96 }, (_, j) =>
      j % 2 === 0 ? samples[j / 2]! : mean(samples[(j - 1) / 2]!, samples[(j + 1) / 2] ?? samples[(j - 1) / 2]!),
    );
  });
}

/** Azimuth from a to b by the shorter way round, a share x of the way [°]. */
const lerpAzimuth = (a: number, b: number, x: number) => {
  const d = ((((b - a) % 360) + 540) % 360) - 180;
  return (((a + d * x) % 360) + 360) % 360;
};

function meanTravel(a: TravelSky, b: TravelSky, x: number): TravelSky {
  return {
    wm2: a.wm2 + (b.wm2 - a.wm2) * x,
    tiltDeg: a.tiltDeg + (b.tiltDeg - a.tiltDeg) * x,
    azimuthDeg: lerpAzimuth(a.azimuthDeg, b.azimuthDeg, x),
    sunWm2: a.sunWm2 + (b.sunWm2 - a.sunWm2) * x,
  };
}

/** Fault windows of one unit over a time range: each kind a Poisson process at its rate, durations as the fleet draws them. */
function faultWindows(plan: [FaultKind, number][], fromMs: number, toMs: number, rng: Rng) {
  const out: { kind: FaultKind; startMs: number; endMs: number }[] = [];
  for (const [kind, perDay] of plan) {
    let t = fromMs + rng.exponential(DAY_MS / perDay);
    while (t < toMs) {
      const durMs = Math.max(300, rng.exponential(FAULT_MEAN_HOURS[kind] * 3600)) * 1000;
      out.push({ kind, startMs: t, endMs: Math.min(toMs, t + durMs) });
      t += durMs + rng.exponential(DAY_MS / perDay);
    }
  }
  return out.sort((a, b) => a.startMs - b.startMs);
}

const overlapMs = (a0: number, a1: number, b0: number, b1: number) => Math.max(0, Math.min(a1, b1) - Math.max(a0, b0));

/**
 * The rollup-level past of every unit over [fromMs, toMs), interval by interval in time order: `onSlot` gets each
 * interval's unit rows and the weather station readings. Returns the fault records (all closed, within the window).
 */
export function rollupModelHistory(
  sites: FleetSiteSpec[],
  w: RollupModelWindow,
  onSlot: (quarters: ModelQuarter[], weather: ModelWeather[]) => void,
): TruthRecord[] {
  const fromMs = Math.floor(w.fromMs / QUARTER_MS) * QUARTER_MS;
  const toMs = Math.ceil(w.toMs / QUARTER_MS) * QUARTER_MS;
  if (!(fromMs < toMs)) return [];
  const step = (w.templateDays ?? 28) * DAY_MS;
  const firstDay = Math.floor(fromMs / step) * step;
  const days: number[] = [];
  for (let d = firstDay; d <= toMs + step; d += step) days.push(d);
  const rng = createRng(`${w.seed}|rollups|${fromMs}`);
  const skies = new Map(sites.map((s) => [s.site.code, templateSkies(s, days, rng.fork(`sky:${s.site.code}`))]));
  const plan = Object.entries(w.faults ?? {}).filter(([, r]) => (r ?? 0) > 0) as [FaultKind, number][];
  const units = sites.flatMap((s) =>
    s.units.map((u) => {
      const unitPlan: [FaultKind, number][] = [...plan];
      if ((u.controller?.detectorTiltDeg ?? 20) < TRAP_PRONE_TILT_DEG) unitPlan.push(['trap', MODEL_TRAPS_PER_DAY]);
      return {
        spec: u,
        site: s,
        key: limitsKey(unitLimits(u)),
        ratedWp: u.ratedPowerWp ?? 420,
        stowGustMs: u.stowGustMs ?? 18,
        perMinute: 60 / (u.controller?.reportIntervalS ?? 5),
        faults: faultWindows(unitPlan, fromMs, toMs, rng.fork(`faults:${u.serial}`)),
      };
    }),
  );
  const truth: TruthRecord[] = units.flatMap((u) =>
    u.faults.map((f) => ({ serial: u.spec.serial, fault: f.kind, start: isoUtc(f.startMs), end: isoUtc(f.endMs) })),
  );
  const lerp = (a: number, b: number, x: number) => a + (b - a) * x;
  for (let q = fromMs; q < toMs; q += QUARTER_MS) {
    const k = Math.floor((q - firstDay) / step);
    const slot = Math.floor((q % DAY_MS) / QUARTER_MS);
    const x = (q - days[k]! - slot * QUARTER_MS) / step;
    const skyAt = (code: string) => {
      const t = skies.get(code)!;
      return { a: t[k]![slot]!, b: t[k + 1]![slot]! };
    };
    const weather: ModelWeather[] = [];
    for (const s of sites) {
      const station = s.units.find((u) => u.weatherStation);
      if (s.site.indoor || !station) continue;
      const { a, b } = skyAt(s.site.code);
      weather.push({
        serial: station.serial,
        tsMs: q + QUARTER_MS / 2,
        ghiWm2: lerp(a.ghiWm2, b.ghiWm2, x),
        dhiWm2: lerp(a.dhiWm2, b.dhiWm2, x),
        airTempC: lerp(a.airTempC, b.airTempC, x),
        windMs: lerp(a.windMs, b.windMs, x),
        gustMs: Math.max(lerp(a.windMs, b.windMs, x), lerp(a.gustMs, b.gustMs, x)),
      });
    }
    const quarters: ModelQuarter[] = [];
    for (const u of units) {
      const { a, b } = skyAt(u.site.site.code);
      let factor = 1;
      let downMs = 0;
      let huntMs = 0;
      // Factors of faults that turn the unit away from its best (the model's in-plane value at its orientation drops too);
      // soiling only dims what the unit measures and produces.
      let turned = 1;
      for (const f of u.faults) {
        if (f.startMs >= q + QUARTER_MS) break;
        const o = overlapMs(q, q + QUARTER_MS, f.startMs, f.endMs);
        if (o <= 0) continue;
        if (MODEL_DOWNTIME_KINDS.has(f.kind)) downMs += o;
        else {
          const share = 1 - (1 - (MODEL_FAULT_FACTOR[f.kind] ?? 1)) * (o / QUARTER_MS);
          factor *= share;
          if (f.kind !== 'soiling') turned *= share;
          if (f.kind === 'hunting') huntMs += o;
        }
      }
      const minutes = Math.max(0, 15 - Math.round(Math.min(QUARTER_MS, downMs) / MINUTE_MS));
      if (minutes === 0) continue;
      // A unit in wind stow lies flat (tilt 0): it gets what a horizontal sensor on site reads.
      const stowed = (t: SlotSky) => t.gustMs > u.stowGustMs;
      const onPlane = (t: SlotSky) => (stowed(t) ? t.ghiWm2 : t.best.get(u.key)!.wm2);
      const ta = a.best.get(u.key)!;
      const tb = b.best.get(u.key)!;
      const best = lerp(ta.wm2, tb.wm2, x);
      const atUnit = Math.max(0, lerp(onPlane(a), onPlane(b), x) * turned);
      const poa = Math.max(0, lerp(onPlane(a), onPlane(b), x) * factor);
      const moduleC = lerp(a.airTempC, b.airTempC, x) + poa * NOCT_RISE_K_PER_WM2;
      const dc = Math.max(0, ((u.ratedWp * poa) / 1000) * (1 + TEMP_COEFF_PER_K * (moduleC - 25)));
      const stowShare = lerp(stowed(a) ? 1 : 0, stowed(b) ? 1 : 0, x);
      const stowedMin = minutes * stowShare;
      const seekingMin = (minutes - stowedMin) * Math.min(1, huntMs / QUARTER_MS);
      quarters.push({
        serial: u.spec.serial,
        bucketMs: q,
        minutes,
        samples: minutes * u.perMinute,
        poaAvgWm2: poa,
        poaMaxWm2: poa,
        dcPowerAvgW: dc,
        energyWh: (dc * minutes) / 60,
        moduleTempC: moduleC,
        tiltDeg: lerp(stowed(a) ? 0 : ta.tiltDeg, stowed(b) ? 0 : tb.tiltDeg, x),
        azimuthDeg: lerpAzimuth(ta.azimuthDeg, tb.azimuthDeg, x),
        seekingMin,
        settledMin: minutes - stowedMin - seekingMin,
        stowedMin,
        modelUnitWm2: atUnit,
        // The unit's own orientation is reachable, so the best is never below it.
        modelBestWm2: Math.max(best, atUnit),
        modelFixedWm2: lerp(a.fixedWm2, b.fixedWm2, x),
        modelSunWm2: lerp(ta.sunWm2, tb.sunWm2, x),
      });
    }
    onSlot(quarters, weather);
  }
  return truth;
}
