/**
 * `npm run eval:learn -- --seed <n> [--level none|low|high] [--json]`
 *
 * The site model learning from its units, offline: the demo's glass-facade roof (QHL) runs in the simulator under its
 * true geometry for three days (its six units tracking, the station reporting); the model is given the survey with
 * survey error at `--level` (default high; test/eval/survey-perturbation.ts has the distributions, the station's gain
 * error included). On days 1–2 a unit scans at twelve times of day; the scans and the other units' settled readings are
 * fitted exactly as the server's survey revision does it (shared/survey-fit through server/health/site-sky), and the
 * revised survey is scored against the unseen day 3:
 *  - model error: mean |measured − modelled| in-plane irradiance at the units' settled orientations every 20 minutes
 *    with the sun above 10° [W/m²];
 *  - global-maximum direction error: mean angle between the model's brightest reachable orientation and the true sky's
 *    (the simulator's field) at the same instants [°];
 * for the survey given (before), the revised one (after) and the true survey fed the same station readings (the floor
 * the station's own error leaves). Trap detection before and after acceptance is not scored here: the detector
 * evaluation (run-eval.ts) has no site-model option yet. With --json the last stdout line is one JSON object.
 */
import { parseArgs } from 'node:util';
import type { Telemetry, UnitEvent, Weather } from '../../shared/contracts/wire';
import type { SiteSurvey } from '../../shared/contracts/survey';
import { bestReachableOrientation, STANDARD_UNIT_LIMITS } from '../../shared/landscape';
import { angleBetweenNormalsDeg, correctionParameters, fitSurveyCorrections, modelError, type FitEpoch } from '../../shared/survey-fit';
import { siteSky } from '../../server/health/site-sky';
import { sunSeenFromSite } from '../../shared/sky-radiance';
import type { ScanSample } from '../../server/health/scan-rebuild';
import { scanEpoch, scanSpan, type ScanRow } from '../../server/health/scan-epochs';
import { DEMO_SURVEYS } from '../../seeds/demo-world';
import { demoFleetSites } from '../../simulator/demo-fleet';
import { createFleet } from '../../simulator/fleet';
import { createRng } from '../../simulator/rng';
import { perturbSurvey, type SurveyErrorLevel } from './survey-perturbation';

const SITE = 'QHL';
const START_MS = Date.parse('2026-05-04T00:00:00Z');
const DAY_MS = 86_400_000;
/** Scan instants (UTC hours of days 1 and 2): twelve, the most one server fit uses. */
const SCAN_HOURS = [
  [0, 5],
  [0, 7],
  [0, 9],
  [0, 11],
  [0, 13],
  [0, 15],
  [1, 6],
  [1, 8],
  [1, 10],
  [1, 12],
  [1, 14],
  [1, 16],
] as const;
const VALIDATION_STEP_MS = 20 * 60_000;
const SETTLED_WINDOW_MS = 120_000;

export interface LearnEvalResult {
  seed: number;
  level: SurveyErrorLevel;
  site: string;
  scans: number;
  fitSamples: number;
  validationInstants: number;
  validationSamples: number;
  fit: {
    iterations: number;
    converged: boolean;
    residualVariance: number | null;
    evaluations: number;
    runtimeS: number;
  };
  /** Day 3 (not fitted): every daylight instant, and those with the station in sun. */
  before: Score;
  after: Score;
  /** The revised survey with the fitted station scale applied (what recalibrating the station would add). */
  afterStationScaled: Score;
  trueSurvey: Score;
  /** The true survey and a station without its gain error: what remains is the site model's own error. */
  trueSurveyAndStation: Score;
  validationInSun: number;
  /** On the fitted scans (as the proposal reports them). */
  fitEpochs: { before: ModelFigures; after: ModelFigures };
  /** On the scans held out of the fit (as the proposal reports them). */
  checkEpochs: { scans: number; before: ModelFigures; after: ModelFigures } | null;
  scansLeftOut: number;
  /** The station scale that undoes the station's gain error (the truth of `station.scale`). */
  stationGainTruth: number;
  parameters: { key: string; given: number; proposed: number; uncertainty: number | null; truth: number; status: string }[];
  trapDetection: null;
  runtimeS: number;
}

interface ModelFigures {
  meanAbsWm2: number;
  globalMaxErrorDeg: number | null;
}

interface Figures {
  meanAbsWm2: number;
  globalMaxErrorDeg: number;
}
type Score = Figures & { stationInSun: Figures };

interface Reading {
  ts: number;
  tiltDeg: number;
  azimuthDeg: number;
  poaWm2: number;
}

const r1 = (x: number) => Math.round(x * 10) / 10;
const r3 = (x: number) => Math.round(x * 1000) / 1000;

export async function runLearnEval(seed: number, level: SurveyErrorLevel): Promise<LearnEvalResult> {
  const t0 = performance.now();
  const spec = demoFleetSites(5).filter((s) => s.site.code === SITE);
  const site = spec[0]!.site;
  const fleet = createFleet({ sites: spec, startUnixMs: START_MS }, { rng: createRng(`learn:${seed}`) });
  const truth = DEMO_SURVEYS[SITE]!;
  const wrong = perturbSurvey(truth, site.albedo, level, seed);
  const where = { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM };
  const serials = spec[0]!.units.map((u) => u.serial);

  const settled = new Map<string, Reading[]>(serials.map((s) => [s, []]));
  const station: { ts: number; ghiWm2: number; dhiWm2: number }[] = [];
  const scans = new Map<
    string,
    { serial: string; samples: ScanSample[]; rows: ScanRow[]; startedMs: number; completedMs: number | null }
  >();
  const truthBest: { atMs: number; best: { tiltDeg: number; azimuthDeg: number } }[] = [];
  const scanAt = SCAN_HOURS.map(([d, h], i) => ({
    atMs: START_MS + d * DAY_MS + h * 3_600_000,
    serial: serials[(i % (serials.length - 1)) + 1]!,
  }));
  let nextScan = 0;
  let nextValidation = START_MS + 2 * DAY_MS;
  const endMs = START_MS + 3 * DAY_MS;
  while (fleet.now() < endMs) {
    while (nextScan < scanAt.length && scanAt[nextScan]!.atMs <= fleet.now()) {
      const s = scanAt[nextScan++]!;
      const commandId = `learn-scan-${nextScan}`;
      fleet.command(s.serial, { v: 1, commandId, ts: new Date(fleet.now()).toISOString(), kind: 'scan' });
      scans.set(commandId, { serial: s.serial, samples: [], rows: [], startedMs: fleet.now(), completedMs: null });
    }
    for (const m of fleet.step(5)) {
      if (m.leaf === 'telemetry') {
        const t = m.payload as Telemetry;
        if (t.mode === 'settled')
          settled.get(m.serial)!.push({ ts: Date.parse(t.ts), tiltDeg: t.tiltDeg, azimuthDeg: t.azimuthDeg, poaWm2: t.poaWm2 });
      } else if (m.leaf === 'events') {
        const e = m.payload as UnitEvent;
        const s = e.commandId ? scans.get(e.commandId) : undefined;
        if (s && e.kind === 'scan-samples') {
          s.samples.push(...((e.samples ?? []) as ScanSample[]));
          s.rows.push({ ts: Date.parse(e.ts), samples: (e.samples ?? []) as ScanSample[] });
        }
        if (s && e.kind === 'scan-complete') s.completedMs = Date.parse(e.ts);
      } else if (m.leaf === 'weather') {
        const w = m.payload as Weather;
        // What the model is fed: the station as a miscalibrated one would report it.
        station.push({ ts: Date.parse(w.ts), ...wrong.station(w.ghiWm2, w.dhiWm2 ?? 0) });
      }
    }
    if (fleet.now() >= nextValidation) {
      const c = fleet.conditions(SITE)!;
      if (c.sunElevationDeg > 10) truthBest.push({ atMs: fleet.now(), best: fleet.bestReachable(c.field) });
      nextValidation += VALIDATION_STEP_MS;
    }
  }

  const weatherOver = (from: number, to: number) => {
    const w = station.filter((x) => x.ts >= from && x.ts <= to);
    if (!w.length) return null;
    return { ghiWm2: w.reduce((s, x) => s + x.ghiWm2, 0) / w.length, dhiWm2: w.reduce((s, x) => s + x.dhiWm2, 0) / w.length };
  };
  const settledNear = (atMs: number, except: string | null) =>
    serials.flatMap((s) => {
      if (s === except) return [];
      let best: Reading | undefined;
      for (const r of settled.get(s)!)
        if (Math.abs(r.ts - atMs) <= SETTLED_WINDOW_MS && (!best || Math.abs(r.ts - atMs) < Math.abs(best.ts - atMs))) best = r;
      return best ? [{ tiltDeg: best.tiltDeg, azimuthDeg: best.azimuthDeg, poaWm2: best.poaWm2 }] : [];
    });

  // The fit's epochs, built as the server builds them (server/services/survey-revision-service.ts).
  const fitEpochs: FitEpoch[] = [];
  for (const s of scans.values()) {
    if (s.completedMs === null || s.samples.length < 8) continue;
    const span = scanSpan(s.rows);
    fitEpochs.push(
      scanEpoch(
        span,
        weatherOver(span.fromMs, span.toMs) ?? weatherOver(span.atMs - 15 * 60_000, span.atMs),
        settledNear(span.atMs, s.serial),
      ),
    );
  }
  const validation: FitEpoch[] = truthBest.map((v) => ({
    atMs: v.atMs,
    weather: weatherOver(v.atMs - 5 * 60_000, v.atMs + 5 * 60_000),
    samples: settledNear(v.atMs, null),
    measuredMax: null,
  }));
  const skyOf = (survey: SiteSurvey, albedo: number, e: FitEpoch) => siteSky({ ...where, albedo }, survey, e.atMs, e.weather).sky;
  const tf = performance.now();
  const fit = await fitSurveyCorrections({ survey: wrong.survey, albedo: wrong.albedo, epochs: fitEpochs, skyOf });
  const fitS = (performance.now() - tf) / 1000;

  // Instants with the sun clear of the site's true horizon: there the station measures the beam, and the model's
  // magnitudes are sound; behind it the station sees none, and the model misses the beam whatever the survey says.
  const inSun = validation.map((v) => sunSeenFromSite(skyOf(truth, site.albedo, v)));
  const scaled = (e: FitEpoch, k: number): FitEpoch =>
    k === 1 || !e.weather
      ? e
      : { ...e, weather: { ghiWm2: e.weather.ghiWm2 * k, dhiWm2: e.weather.dhiWm2 === null ? null : e.weather.dhiWm2 * k } };
  const scoreOn = async (survey: SiteSurvey, albedo: number, which: (i: number) => boolean, k: number) => {
    const picked = validation.filter((_, i) => which(i)).map((v) => scaled(v, k));
    const e = await modelError(survey, albedo, picked, skyOf);
    let angle = 0;
    validation.forEach((v, i) => {
      if (which(i))
        angle += angleBetweenNormalsDeg(
          bestReachableOrientation(skyOf(survey, albedo, scaled(v, k)), STANDARD_UNIT_LIMITS),
          truthBest[i]!.best,
        );
    });
    return { meanAbsWm2: r1(e.meanAbsWm2), globalMaxErrorDeg: r1(angle / Math.max(1, picked.length)) };
  };
  /** `k`: a scale on the station's readings (1 = as the station reports). */
  const score = async (survey: SiteSurvey, albedo: number, k = 1) => ({
    ...(await scoreOn(survey, albedo, () => true, k)),
    stationInSun: await scoreOn(survey, albedo, (i) => inSun[i]!, k),
  });
  const truthParams = correctionParameters(truth, site.albedo);
  const round = (e: { meanAbsWm2: number; globalMaxErrorDeg: number | null }) => ({
    meanAbsWm2: r1(e.meanAbsWm2),
    globalMaxErrorDeg: e.globalMaxErrorDeg === null ? null : r1(e.globalMaxErrorDeg),
  });
  return {
    seed,
    level,
    site: SITE,
    scans: fitEpochs.length,
    fitSamples: fit.samples,
    validationInstants: validation.length,
    validationSamples: validation.reduce((n, v) => n + v.samples.length, 0),
    fit: {
      iterations: fit.iterations,
      converged: fit.converged,
      residualVariance: fit.residualVariance === null ? null : r3(fit.residualVariance),
      evaluations: fit.evaluations,
      runtimeS: r1(fitS),
    },
    validationInSun: inSun.filter(Boolean).length,
    before: await score(wrong.survey, wrong.albedo),
    after: await score(fit.survey, fit.albedo),
    afterStationScaled: await score(fit.survey, fit.albedo, fit.stationScale),
    trueSurvey: await score(truth, site.albedo),
    trueSurveyAndStation: await score(truth, site.albedo, 1 / wrong.stationGain),
    fitEpochs: { before: round(fit.before), after: round(fit.after) },
    checkEpochs: fit.check ? { scans: fit.check.epochs, before: round(fit.check.before), after: round(fit.check.after) } : null,
    scansLeftOut: fit.epochsLeftOut,
    stationGainTruth: r3(1 / wrong.stationGain),
    parameters: fit.parameters.map((p) => {
      // The truth of a parameter is the true survey's value of the same quantity (horizon sectors: the mean of the true
      // heights of the same points).
      const t = truthParams.find((q) => q.key === p.key);
      return {
        key: p.key,
        given: r3(p.before),
        proposed: r3(p.after),
        uncertainty: p.uncertainty === null ? null : r3(p.uncertainty),
        truth: r3(t?.value ?? NaN),
        status: p.status,
      };
    }),
    trapDetection: null,
    runtimeS: r1((performance.now() - t0) / 1000),
  };
}

async function main(): Promise<void> {
  let values;
  try {
    ({ values } = parseArgs({
      args: process.argv.slice(2),
      strict: true,
      options: { seed: { type: 'string' }, level: { type: 'string' }, json: { type: 'boolean' }, help: { type: 'boolean' } },
    }));
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    process.exit(2);
  }
  if (values.help) {
    process.stdout.write('eval:learn --seed <n> [--level none|low|high (default high)] [--json]\n');
    return;
  }
  const seed = values.seed === undefined ? 1 : Number(values.seed);
  if (!Number.isInteger(seed) || seed < 0 || seed > 2 ** 31) {
    process.stderr.write(`--seed must be a whole number in 0…${2 ** 31}, got ${values.seed}\n`);
    process.exit(2);
  }
  const level = (values.level ?? 'high') as SurveyErrorLevel;
  if (!['none', 'low', 'high'].includes(level)) {
    process.stderr.write(`--level must be none, low or high, got ${values.level}\n`);
    process.exit(2);
  }
  const r = await runLearnEval(seed, level);
  if (values.json) {
    process.stdout.write(`${JSON.stringify(r)}\n`);
    return;
  }
  const line = (name: string, e: Score) =>
    `${name.padEnd(22)} ${String(e.meanAbsWm2).padStart(8)} W/m²   ${String(e.globalMaxErrorDeg).padStart(6)}°` +
    `      ${String(e.stationInSun.meanAbsWm2).padStart(8)} W/m²   ${String(e.stationInSun.globalMaxErrorDeg).padStart(6)}°\n`;
  process.stdout.write(
    `seed ${seed}, survey error ${level}: ${r.scans} scans (${r.fitSamples} samples) fitted in ${r.fit.runtimeS} s, ${r.fit.iterations} iterations` +
      '; ' +
      `day 3: ${r.validationInstants} instants, ${r.validationSamples} settled readings; ${r.runtimeS} s in all\n`,
  );
  process.stdout.write(
    `model (day 3, unseen)  every daylight instant (${r.validationInstants})   station in sun (${r.validationInSun})\n` +
      '                       mean |meas − model|  global max   mean |meas − model|  global max\n',
  );
  process.stdout.write(
    line('survey given', r.before) +
      line('revised survey', r.after) +
      line(`  + station × ${r.parameters.find((p) => p.key === 'station.scale')?.proposed ?? 1}`, r.afterStationScaled) +
      line('true survey', r.trueSurvey) +
      line('  + true station', r.trueSurveyAndStation),
  );
  if (r.checkEpochs)
    process.stdout.write(
      `held-out scans (${r.checkEpochs.scans}): ${r.checkEpochs.before.meanAbsWm2} → ${r.checkEpochs.after.meanAbsWm2} W/m²; ` +
        `fitted scans: ${r.fitEpochs.before.meanAbsWm2} → ${r.fitEpochs.after.meanAbsWm2} W/m²; ${r.scansLeftOut} scans left out (sun near an edge)\n`,
    );
  process.stdout.write(
    `parameter                          given  proposed ± 1 s.e.     truth   status   (station.scale truth: ${r.stationGainTruth})\n`,
  );
  for (const p of r.parameters)
    process.stdout.write(
      `${p.key.padEnd(32)} ${String(p.given).padStart(8)} ${String(p.proposed).padStart(8)} ± ${String(p.uncertainty ?? '—').padStart(6)} ${String(p.truth).padStart(8)}   ${p.status}\n`,
    );
  process.stdout.write('trap detection before/after: not scored (the detector evaluation has no site-model option yet)\n');
}

if (import.meta.url === `file://${process.argv[1]}`) void main();
