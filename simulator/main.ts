/**
 * Fleet simulator CLI.
 *   npm start                       (runs `--demo`: every demo unit on 127.0.0.1:1884, real time, report every 5 s)
 *   npm run simulate -- [options]   any fleet against any broker; see --help
 * Runs until SIGINT/SIGTERM (or --duration), then publishes an offline status for every unit and disconnects cleanly.
 */
import { createWriteStream, readFileSync, type WriteStream } from 'node:fs';
import { parseArgs } from 'node:util';
import { WIRE_RANGES } from '../shared/contracts/wire-format';
import { DEMO_SITES, demoSerials } from '../shared/demo-world';
import { parseInstant } from '../shared/solar-position';
import { acceleratedClock, isoUtc, wallClock } from './clock';
import { DEMO_SCENARIO_BY_SITE, demoFleetSites, demoSiteInfo } from './demo-fleet';
import { FAULT_KINDS, parseFaultPlan, type FaultPlan } from './faults';
import { createFleet, type Fleet, type FleetSiteSpec } from './fleet';
import { createPublisher } from './publisher';
import { createRng } from './rng';
import { SCENARIOS, SCENARIO_NAMES, UnknownNameError } from './scenarios';
import { baselineSummary } from './baseline-report';

const HELP = `Brightward fleet simulator

  --demo                  the demo fleet (${demoSerials().length} units, ${DEMO_SITES.length} sites, each with its own scenario) on 127.0.0.1:1884
  --broker <url>          broker URL (default mqtt://$BW_BROKER_HOST:$BW_BROKER_PORT, i.e. mqtt://127.0.0.1:1884)
  --offline               no broker: step the fleet as fast as possible (needs --duration) and write the files
  --scenario <name>       sky scenario for a custom fleet (default clear-day); one of: ${SCENARIO_NAMES.join(', ')}
  --site <code>           location of the custom fleet's site, a demo site code (default QED)
  --units <n>             units in the custom fleet (default 6)
  --prefix <text>         serial prefix of the custom fleet (default SIM): SIM-0001, SIM-0002, …
  --detector-tilt <deg>   detector tilt of the custom fleet's units (default 20)
  --secrets <file>        JSON object { serial: deviceSecret } (with --demo default: $BW_DEMO_SECRETS_FILE or
                          .data/demo/device-secrets.json, written when the demo is seeded)
  --seed <n>              random seed (default 1); the same seed gives the same run
  --speed <x>             simulated seconds per real second (default 1; 60 = one simulated minute per second)
  --start <ISO instant>   simulated start, with offset (default: now)
  --duration <s>          stop after this many simulated seconds (default: run until Ctrl-C)
  --report-interval <s>   telemetry interval (default 5)
  --faults <k=rate,…>     inject faults; rate per unit per simulated day; kinds: ${FAULT_KINDS.join(', ')}
  --truth <file>          write ground truth as JSON lines { serial, fault, start, end }
  --baseline <file>       write per-unit energy against the fixed-tilt and sun-following twins, JSON lines per simulated hour
  --list                  list scenarios and fault kinds
  --help`;

interface Options {
  demo: boolean;
  offline: boolean;
  broker: string;
  scenario: string;
  site: string;
  units: number;
  prefix: string;
  detectorTilt: number;
  secrets?: string;
  seed: string;
  speed: number;
  start?: string;
  duration?: number;
  reportInterval: number;
  faults: FaultPlan;
  truth?: string;
  baseline?: string;
}

export class UsageError extends Error {}

export function parseOptions(argv: string[], env: NodeJS.ProcessEnv = process.env): Options | 'help' | 'list' {
  const { values } = parseArgs({
    args: argv,
    strict: true,
    options: {
      demo: { type: 'boolean' },
      offline: { type: 'boolean' },
      broker: { type: 'string' },
      scenario: { type: 'string' },
      site: { type: 'string' },
      units: { type: 'string' },
      prefix: { type: 'string' },
      'detector-tilt': { type: 'string' },
      secrets: { type: 'string' },
      seed: { type: 'string' },
      speed: { type: 'string' },
      start: { type: 'string' },
      duration: { type: 'string' },
      'report-interval': { type: 'string' },
      faults: { type: 'string' },
      truth: { type: 'string' },
      baseline: { type: 'string' },
      list: { type: 'boolean' },
      help: { type: 'boolean' },
    },
  });
  if (values.help) return 'help';
  if (values.list) return 'list';
  const num = (name: string, text: string | undefined, dflt: number, lo: number, hi: number) => {
    if (text === undefined) return dflt;
    const x = Number(text);
    if (!Number.isFinite(x) || x < lo || x > hi) throw new UsageError(`--${name} must be a number in ${lo}…${hi}, got ${text}`);
    return x;
  };
  const scenario = values.scenario ?? 'clear-day';
  if (!SCENARIOS[scenario]) throw new UnknownNameError('scenario', scenario, SCENARIO_NAMES);
  const site = values.site ?? 'QED';
  if (!DEMO_SCENARIO_BY_SITE[site]) throw new UnknownNameError('site', site, Object.keys(DEMO_SCENARIO_BY_SITE));
  const host = env['BW_BROKER_HOST'] ?? '127.0.0.1';
  const port = env['BW_BROKER_PORT'] ?? '1884';
  const o: Options = {
    demo: values.demo ?? false,
    offline: values.offline ?? false,
    broker: values.broker ?? `mqtt://${host}:${port}`,
    scenario,
    site,
    units: num('units', values.units, 6, 1, 100_000),
    prefix: values.prefix ?? 'SIM',
    detectorTilt: num('detector-tilt', values['detector-tilt'], 20, ...WIRE_RANGES.detectorTiltDeg),
    secrets: values.secrets,
    seed: values.seed ?? '1',
    speed: num('speed', values.speed, 1, 0.01, 100_000),
    start: values.start,
    duration: values.duration === undefined ? undefined : num('duration', values.duration, 0, 1, 1e9),
    reportInterval: num('report-interval', values['report-interval'], 5, ...WIRE_RANGES.reportIntervalS),
    faults: values.faults ? parseFaultPlan(values.faults) : {},
    truth: values.truth,
    baseline: values.baseline,
  };
  if (!/^[A-Z0-9][A-Z0-9-]{0,20}$/.test(o.prefix))
    throw new UsageError('--prefix: capital letters, digits and dashes, up to 21 characters');
  if (o.offline && o.duration === undefined) throw new UsageError('--offline needs --duration');
  return o;
}

export function fleetSites(o: Options): FleetSiteSpec[] {
  if (o.demo) return demoFleetSites(o.reportInterval);
  const site = demoSiteInfo(o.site);
  return [
    {
      site: { ...site, code: o.prefix, name: `${o.prefix} site (${o.scenario})`, indoor: o.scenario === 'atrium-lamps' },
      scenario: o.scenario,
      units: Array.from({ length: o.units }, (_, i) => ({
        serial: `${o.prefix}-${String(i + 1).padStart(4, '0')}`,
        siteCode: o.prefix,
        controller: { detectorTiltDeg: o.detectorTilt, reportIntervalS: o.reportInterval },
        weatherStation: i === 0 && o.scenario !== 'atrium-lamps',
      })),
    },
  ];
}

function writeLines(stream: WriteStream | null, rows: object[]): void {
  if (stream) for (const r of rows) stream.write(`${JSON.stringify(r)}\n`);
}

async function run(o: Options): Promise<void> {
  const real = wallClock();
  const startMs = o.start ? parseInstant(o.start, '--start').unixMs : Math.floor(real.now() / 1000) * 1000;
  const fleet: Fleet = createFleet({ sites: fleetSites(o), startUnixMs: startMs, faults: o.faults }, { rng: createRng(o.seed) });
  const truthOut = o.truth ? createWriteStream(o.truth) : null;
  const baselineOut = o.baseline ? createWriteStream(o.baseline) : null;
  let truthWritten = 0;
  const hourly = baselineSummary(fleet);
  const flushTruth = (final: boolean) => {
    const all = fleet.truth();
    const closed = all.filter((r) => r.end !== null);
    // Closed records are appended in the order they closed; open ones are written once, at the end.
    writeLines(truthOut, closed.slice(truthWritten));
    truthWritten = closed.length;
    if (final)
      writeLines(
        truthOut,
        all.filter((r) => r.end === null),
      );
  };
  const log = (line: string) => process.stderr.write(`[simulator] ${line}\n`);
  const units = fleet.units.length;
  if (o.offline) {
    const t0 = real.now();
    let msgs = 0;
    let left = o.duration!;
    while (left > 0) {
      const d = Math.min(3600, left);
      msgs += fleet.step(d).length;
      left -= d;
      writeLines(baselineOut, hourly.next());
      flushTruth(false);
    }
    flushTruth(true);
    log(`offline: ${units} units, ${o.duration} s simulated, ${msgs} messages, ${((real.now() - t0) / 1000).toFixed(1)} s`);
    printSummary(fleet);
    await Promise.all([truthOut, baselineOut].map((s) => s && new Promise<void>((res) => s.end(() => res()))));
    return;
  }
  const secrets = readSecrets(
    o.secrets ?? (o.demo ? (process.env['BW_DEMO_SECRETS_FILE'] ?? '.data/demo/device-secrets.json') : undefined),
  );
  const clock = acceleratedClock(real, startMs, o.speed);
  const publisher = createPublisher(fleet, { url: o.broker, secretOf: (s) => secrets[s] ?? '', now: () => fleet.now(), log });
  log(`${units} units → ${o.broker}, speed ${o.speed}, start ${isoUtc(startMs)}, seed ${o.seed}${o.demo ? ' (demo)' : ''}`);
  await publisher.start(30_000).catch((e: Error) => log(`${e.message}; continuing, units keep buffering until they connect`));
  log(`${publisher.connected()}/${units} connected`);
  const tickMs = 250;
  let lastHour = Math.floor(startMs / 3_600_000);
  const timer = setInterval(() => {
    const target = Math.min(clock.now(), o.duration !== undefined ? startMs + o.duration * 1000 : Infinity);
    publisher.publish(fleet.advanceTo(target));
    publisher.syncLinks();
    const hour = Math.floor(fleet.now() / 3_600_000);
    if (hour !== lastHour) {
      lastHour = hour;
      writeLines(baselineOut, hourly.next());
    }
    flushTruth(false);
    if (o.duration !== undefined && fleet.now() >= startMs + o.duration * 1000) void shutdown('duration reached');
  }, tickMs);
  let stopping = false;
  const shutdown = async (why: string) => {
    if (stopping) return;
    stopping = true;
    clearInterval(timer);
    log(`stopping (${why})`);
    publisher.publish(fleet.advanceTo(fleet.now()));
    await publisher.stop();
    writeLines(baselineOut, hourly.next());
    flushTruth(true);
    printSummary(fleet);
    await Promise.all([truthOut, baselineOut].map((s) => s && new Promise<void>((res) => s.end(() => res()))));
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

/** Device secrets by serial; a unit without one cannot connect (the broker refuses it and says so in its log). */
function readSecrets(file: string | undefined): Record<string, string> {
  if (!file) return {};
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as Record<string, string>;
  } catch (e) {
    throw new Error(
      `cannot read device secrets from ${file}: ${(e as Error).message}. Seed the demo first (npm start or npm run db:seed).`,
    );
  }
}

function printSummary(fleet: Fleet): void {
  const rows = fleet.baselines();
  const sum = (f: (b: (typeof rows)[number]) => number) => rows.reduce((a, b) => a + f(b), 0);
  const unit = sum((b) => b.unitDcWh);
  const fixed = sum((b) => b.fixedTiltDcWh);
  const sun = sum((b) => b.sunFollowingDcWh);
  const pct = (a: number, b: number) => (b > 0 ? `${(((a - b) / b) * 100).toFixed(1)} %` : 'n/a');
  process.stderr.write(
    `[simulator] DC energy of ${rows.length} units: ${(unit / 1000).toFixed(2)} kWh; fixed-tilt twins ${(fixed / 1000).toFixed(2)} kWh (${pct(unit, fixed)}); sun-following twins ${(sun / 1000).toFixed(2)} kWh (${pct(unit, sun)})\n`,
  );
}

async function main(): Promise<void> {
  let o: ReturnType<typeof parseOptions>;
  try {
    o = parseOptions(process.argv.slice(2));
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    process.exit(2);
  }
  if (o === 'help') return void process.stdout.write(`${HELP}\n`);
  if (o === 'list') {
    for (const [n, s] of Object.entries(SCENARIOS)) process.stdout.write(`scenario  ${n.padEnd(14)} ${s.description}\n`);
    for (const f of FAULT_KINDS) process.stdout.write(`fault     ${f}\n`);
    return;
  }
  await run(o);
}

if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) void main();
