/**
 * `npm run bench:ingest [-- --units 10000 --rates 2000,5000,8000,10000,12000 --window 30 --cpu-profile <file> --json]`
 *
 * Units publish telemetry (QoS 1) from separate processes at a rising aggregate rate into the embedded broker; the
 * in-process ingest writes to MariaDB. For each step we measure committed rows/s, publish → commit lag and
 * publish → browser-socket lag (a WebSocket client subscribed to the whole fleet). A step is sustained when the
 * committed rate keeps up with the offered rate and the backlog (published − committed) does not grow over the window.
 * Publish → commit is the commit time of a reading's batch minus its publish time (as before the broker acknowledged
 * after commit); publish → PUBACK, measured by the load processes, is what a unit waits for its acknowledgement.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { pino } from 'pino';
import request from 'supertest';
import bcrypt from 'bcryptjs';
import { loadConfig } from '../../server/config';
import { startStack, type Stack } from '../../server/stack';
import { globalMaxOf } from '../../server/health/site-sky';
import { DEFAULT_HEALTH_SERVICE_OPTIONS } from '../../server/services/health-service';
import { detectorReadings } from '../../shared/landscape';
import { declinationCooperDeg } from '../../shared/solar-position/declination-cooper-1969';
import { equationOfTimeSpencerMin } from '../../shared/solar-position/equation-of-time-spencer-1971';
import type { UnitLoadReading } from './unit-load';
import { createTestDatabase } from '../helpers/test-db';
import { hashDeviceSecret } from '../../server/services/device-secret';
import { CpuSplit, machineBusySeconds } from './proc-cpu';

const { values: args } = parseArgs({
  options: {
    units: { type: 'string', default: '10000' },
    rates: { type: 'string', default: '2000,5000,8000,10000,12000' },
    window: { type: 'string', default: '30' },
    warmup: { type: 'string', default: '5' },
    processes: { type: 'string', default: '2' },
    // Writes a V8 CPU profile (the profiler behind node --cpu-prof) of the server's measured window of the first step.
    'cpu-profile': { type: 'string' },
    json: { type: 'boolean', default: false },
  },
});
const UNITS = Number(args.units);
const RATES = args.rates!.split(',').map(Number);
const WINDOW_S = Number(args.window);
const WARMUP_S = Number(args.warmup);
const PROCS = Number(args.processes);
const SECRET = 'bench-device-secret';
const DETECTOR_TILT_DEG = 20;
const say = (...a: unknown[]) => {
  if (!args.json) console.log(...a);
  else console.error(...a);
};

/**
 * Where it is about solar noon now, with the sun 70° high (latitude = declination − 20°): the health detectors then
 * take their daylight path — the costly one, and the one a fleet spends its working day on — whatever the time of day
 * or year the benchmark runs. Declination after Cooper (1969) and the equation of time after Spencer (1971), both
 * about ±1° / ±0.5 min, which is plenty here.
 */
function middayPlace(atMs: number): { latitudeDeg: number; longitudeDeg: number } {
  const d = new Date(atMs);
  const dayOfYear = Math.floor((atMs - Date.UTC(d.getUTCFullYear(), 0, 1)) / 86_400_000) + 1;
  const utcHours = d.getUTCHours() + d.getUTCMinutes() / 60;
  // Solar time = UTC + longitude/15 h + equation of time; noon where that is 12 h.
  const lon = (12 - utcHours - equationOfTimeSpencerMin(dayOfYear) / 60) * 15;
  return { latitudeDeg: declinationCooperDeg(dayOfYear) - 20, longitudeDeg: ((((lon + 180) % 360) + 360) % 360) - 180 };
}

/**
 * A healthy, settled unit's report at the site now: pointing at the modelled brightest orientation, its detector pairs
 * reading what the model says they read there, so no detector finds a fault (as for most of a fleet most of the day).
 */
async function healthyReading(stack: Stack, siteId: number, detectorTiltDeg: number): Promise<UnitLoadReading> {
  const { sky } = await stack.siteModel.skyAt(siteId, Date.now());
  const best = globalMaxOf(sky, DEFAULT_HEALTH_SERVICE_OPTIONS.maxTiltDeg);
  const r = detectorReadings(sky, best.tiltDeg, best.azimuthDeg, detectorTiltDeg);
  const r1 = (x: number) => Math.round(x * 10) / 10;
  return {
    tiltPlusWm2: r1(r.tiltPlusWm2),
    tiltMinusWm2: r1(r.tiltMinusWm2),
    azimuthPlusWm2: r1(r.azimuthPlusWm2),
    azimuthMinusWm2: r1(r.azimuthMinusWm2),
    poaWm2: r1(r.panelWm2),
    tiltDeg: r1(best.tiltDeg),
    azimuthDeg: r1(best.azimuthDeg),
    // 400 Wp at about 85 % of its rating per kW/m²
    dcPowerW: r1((400 * 0.85 * r.panelWm2) / 1000),
  };
}

/** The V8 sampling profiler on this process between `start` and `stopTo(file)` (a `.cpuprofile`, as node --cpu-prof writes). */
function windowProfiler() {
  const session = new Session();
  return {
    async start() {
      session.connect();
      await session.post('Profiler.enable');
      await session.post('Profiler.start');
    },
    async stopTo(file: string) {
      const { profile } = await session.post('Profiler.stop');
      writeFileSync(file, JSON.stringify(profile));
      session.disconnect();
      say(`CPU profile of the measured window: ${file} (summary: node --import tsx test/bench/profile-summary.ts ${file})`);
    },
  };
}

const pct = (xs: number[], p: number) => {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  return Math.round(s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]!);
};

async function main() {
  const testDb = await createTestDatabase({ env: { BW_LOG_LEVEL: 'silent' } });
  const { db } = testDb;
  // One owner, one site, UNITS units sharing one bench secret.
  const [ownerId] = await db('owners').insert({ name: 'Bench Owner' });
  const place = middayPlace(Date.now());
  const [siteId] = await db('sites').insert({
    owner_id: ownerId,
    name: 'Bench Site',
    latitude_deg: place.latitudeDeg,
    longitude_deg: place.longitudeDeg,
    elevation_m: 100,
    time_zone: 'UTC',
    albedo: 0.2,
  });
  const serials = Array.from({ length: UNITS }, (_, i) => `BN-${String(i).padStart(6, '0')}`);
  const hash = hashDeviceSecret(SECRET);
  for (let i = 0; i < serials.length; i += 2000) {
    await db('units').insert(
      serials.slice(i, i + 2000).map((serial) => ({
        serial,
        site_id: siteId,
        rated_power_wp: 400,
        detector_tilt_deg: DETECTOR_TILT_DEG,
        firmware: '2.4.1',
        device_secret_hash: hash,
      })),
    );
  }
  await db('users').insert({
    email: 'bench@bench.example',
    name: 'Bench',
    role: 'technician',
    password_hash: await bcrypt.hash('bench-password', 4),
  });

  const commitLags: number[] = [];
  let committed = 0;
  let measuring = false;
  const base = loadConfig({ ...process.env, BW_LOG_LEVEL: 'silent' });
  const stack = await startStack(
    { ...testDb.config, port: 0, broker: { ...base.broker, port: 0 }, db: { ...testDb.config.db, poolMax: 8 } },
    pino({ level: 'warn' }),
    {
      ingest: { flushConcurrency: 4 },
      rollupIntervalMs: 5000,
      listeners: {
        committed: (rows, at) => {
          committed += rows.length;
          if (measuring) for (const r of rows) commitLags.push(at - r.ts.getTime());
        },
      },
    },
  );

  // A browser-like socket watching the whole fleet, in its own process (socket-watcher.ts).
  const signIn = await request(stack.http).post('/api/auth/sign-in').send({ email: 'bench@bench.example', password: 'bench-password' });
  const cookie = String(signIn.headers['set-cookie']).split(';')[0]!;
  const watcher = fork(fileURLToPath(new URL('./socket-watcher.ts', import.meta.url)), [`${stack.url.replace('http', 'ws')}/ws`, cookie], {
    execArgv: ['--import', 'tsx'],
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
  });
  let socketLags: number[] = [];
  let socketLagsReady: ((lags: number[]) => void) | undefined;
  watcher.on('message', (m: { type: string; lags?: number[] }) => m.type === 'socketLags' && socketLagsReady?.(m.lags!));
  await new Promise<void>((res, rej) => {
    watcher.on('message', (m: { type: string }) => m.type === 'ready' && res());
    watcher.once('exit', (code) => rej(new Error(`socket watcher exited with ${code}`)));
  });

  const reading = await healthyReading(stack, Number(siteId), DETECTOR_TILT_DEG);
  say(`bench site at ${place.latitudeDeg.toFixed(1)}°, ${place.longitudeDeg.toFixed(1)}° (solar noon now); units report`, reading);

  // Load processes, each with its share of the units.
  const children: { proc: ChildProcess; published: number; acked: number; ackLags?: (lags: number[]) => void }[] = [];
  const script = fileURLToPath(new URL('./unit-load.ts', import.meta.url));
  say(`connecting ${UNITS} units from ${PROCS} processes…`);
  await Promise.all(
    Array.from({ length: PROCS }, (_, p) => {
      const share = serials.filter((_, i) => i % PROCS === p);
      const proc = fork(script, [String(stack.broker.port), SECRET, ...share], {
        execArgv: ['--import', 'tsx'],
        stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
      });
      proc.send({ type: 'reading', reading });
      const c: (typeof children)[number] = { proc, published: 0, acked: 0 };
      children.push(c);
      return new Promise<void>((res, rej) => {
        proc.on('message', (m: { type: string; published?: number; acked?: number; lags?: number[] }) => {
          if (m.type === 'ready') res();
          if (m.type === 'counts') {
            c.published = m.published!;
            c.acked = m.acked!;
          }
          if (m.type === 'ackLags') c.ackLags?.(m.lags!);
        });
        proc.once('exit', (code) => rej(new Error(`load process exited with ${code}`)));
      });
    }),
  );
  say(`connected: ${stack.broker.clients()} clients`);
  const published = () => children.reduce((s, c) => s + c.published, 0);
  const sleep = (s: number) => new Promise((r) => setTimeout(r, s * 1000));
  // Where the machine's CPU goes: this process is the server (broker, ingest, health, sockets); MariaDB by its pid file.
  const [[{ pidFile }]] = (await db.raw('SELECT @@pid_file AS pidFile')) as unknown as [[{ pidFile: string }]];
  const mariadbPid = Number(readFileSync(pidFile, 'utf8').trim());
  const cpu = new CpuSplit({
    server: () => [process.pid],
    generators: () => children.map((c) => c.proc.pid!),
    socketWatcher: () => [watcher.pid!],
    mariadb: () => (Number.isInteger(mariadbPid) ? [mariadbPid] : []),
  });

  const profiler = windowProfiler();
  const steps: Record<string, number | boolean | null>[] = [];
  let best: (typeof steps)[number] | undefined;
  for (const rate of RATES) {
    for (const c of children) c.proc.send({ type: 'rate', rate: rate / PROCS });
    await sleep(WARMUP_S);
    commitLags.length = 0;
    const c0 = committed;
    const backlog0 = published() - committed;
    if (args['cpu-profile'] && rate === RATES[0]) await profiler.start();
    cpu.mark();
    const machine0 = machineBusySeconds();
    const cpuServer0 = process.cpuUsage();
    const t0 = performance.now();
    measuring = true;
    for (const c of children) c.proc.send({ type: 'measure', on: true });
    watcher.send({ type: 'measure', on: true });
    await sleep(WINDOW_S);
    measuring = false;
    const windowS = (performance.now() - t0) / 1000;
    const committedInWindow = committed - c0;
    const serverCpu = process.cpuUsage(cpuServer0);
    const split = cpu.read();
    const machine1 = machineBusySeconds();
    if (args['cpu-profile'] && rate === RATES[0]) await profiler.stopTo(args['cpu-profile']);
    socketLags = await new Promise<number[]>((res) => {
      socketLagsReady = res;
      watcher.send({ type: 'measure', on: false });
    });
    const ackLags = (
      await Promise.all(
        children.map(
          (c) =>
            new Promise<number[]>((res) => {
              c.ackLags = res;
              c.proc.send({ type: 'measure', on: false });
            }),
        ),
      )
    ).flat();
    const serverCpuS = (serverCpu.user + serverCpu.system) / 1e6;
    const pctOf = (s: number) => Math.round((s / windowS) * 100);
    const committedRate = committedInWindow / windowS;
    const backlog1 = published() - committed;
    const sustained = committedRate >= rate * 0.97 && backlog1 - backlog0 < rate * 0.5;
    const step = {
      offeredMsgsPerSec: rate,
      committedMsgsPerSec: Math.round(committedRate),
      backlogStart: backlog0,
      backlogEnd: backlog1,
      p50PublishToCommitMs: pct(commitLags, 50),
      p99PublishToCommitMs: pct(commitLags, 99),
      p99PublishToSocketMs: pct(socketLags, 99),
      p50PublishToAckMs: pct(ackLags, 50),
      p99PublishToAckMs: pct(ackLags, 99),
      // Server CPU per committed reading [µs], and the machine's CPU by process group [% of one core; 200 % = both cores].
      serverCpuUsPerMsg: committedInWindow ? Math.round((serverCpuS * 1e6) / committedInWindow) : null,
      serverCpuPct: pctOf(serverCpuS),
      generatorsCpuPct: pctOf(split.generators),
      socketWatcherCpuPct: pctOf(split.socketWatcher),
      mariadbCpuPct: pctOf(split.mariadb),
      // Everything else on the machine (other tenants): a step measured while this is high is not a figure to quote.
      otherCpuPct:
        machine0 === null || machine1 === null
          ? null
          : pctOf(Math.max(0, machine1 - machine0 - serverCpuS - split.generators - split.socketWatcher - split.mariadb)),
      sustained,
    };
    steps.push(step);
    say(JSON.stringify(step));
    if (sustained) best = step;
    else break;
  }

  for (const c of children) c.proc.send({ type: 'stop' });
  await Promise.all(children.map((c) => new Promise((r) => c.proc.once('exit', r))));
  await stack.ingest.drain(60_000);
  const acked = children.reduce((s, c) => s + c.acked, 0);
  const total = published();
  const [{ rows }] = (await db('telemetry').count({ rows: '*' })) as [{ rows: number }];
  watcher.kill();
  await stack.stop();
  await testDb.drop();

  const result = {
    units: UNITS,
    offeredMsgsPerSec: steps.at(-1)?.['offeredMsgsPerSec'] ?? 0,
    sustainedMsgsPerSec: best?.['committedMsgsPerSec'] ?? 0,
    p50PublishToCommitMs: best?.['p50PublishToCommitMs'] ?? null,
    p99PublishToCommitMs: best?.['p99PublishToCommitMs'] ?? null,
    p99PublishToSocketMs: best?.['p99PublishToSocketMs'] ?? null,
    p99PublishToAckMs: best?.['p99PublishToAckMs'] ?? null,
    serverCpuUsPerMsg: best?.['serverCpuUsPerMsg'] ?? null,
    cpuPctAtSustained: best
      ? {
          server: best['serverCpuPct'],
          generators: best['generatorsCpuPct'],
          socketWatcher: best['socketWatcherCpuPct'],
          mariadb: best['mariadbCpuPct'],
          other: best['otherCpuPct'],
        }
      : null,
    lost: Math.max(0, acked - Number(rows)),
    // Every publish carries a unique (unit, ts); more rows than publishes would mean something was stored twice.
    duplicated: Math.max(0, Number(rows) - total),
    published: total,
    acked,
    stored: Number(rows),
    steps,
  };
  if (args.json) console.log(JSON.stringify(result));
  else {
    console.table(steps);
    console.log(result);
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
