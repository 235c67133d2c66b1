/**
 * `npm run bench:ingest [-- --units 10000 --rates 2000,5000,8000,10000,12000 --window 30 --json]`
 *
 * Units publish telemetry (QoS 1) from separate processes at a rising aggregate rate into the embedded broker; the
 * in-process ingest writes to MariaDB. For each step we measure committed rows/s, publish → commit lag and
 * publish → browser-socket lag (a WebSocket client subscribed to the whole fleet). A step is sustained when the
 * committed rate keeps up with the offered rate and the backlog (published − committed) does not grow over the window.
 * Publish → commit is the commit time of a reading's batch minus its publish time (as before the broker acknowledged
 * after commit); publish → PUBACK, measured by the load processes, is what a unit waits for its acknowledgement.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { pino } from 'pino';
import request from 'supertest';
import bcrypt from 'bcryptjs';
import { loadConfig } from '../../server/config';
import { startStack } from '../../server/stack';
import { createTestDatabase } from '../helpers/test-db';
import { hashDeviceSecret } from '../../server/services/device-secret';

const { values: args } = parseArgs({
  options: {
    units: { type: 'string', default: '10000' },
    rates: { type: 'string', default: '2000,5000,8000,10000,12000' },
    window: { type: 'string', default: '30' },
    warmup: { type: 'string', default: '5' },
    processes: { type: 'string', default: '2' },
    json: { type: 'boolean', default: false },
  },
});
const UNITS = Number(args.units);
const RATES = args.rates!.split(',').map(Number);
const WINDOW_S = Number(args.window);
const WARMUP_S = Number(args.warmup);
const PROCS = Number(args.processes);
const SECRET = 'bench-device-secret';
const say = (...a: unknown[]) => {
  if (!args.json) console.log(...a);
  else console.error(...a);
};

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
  const [siteId] = await db('sites').insert({
    owner_id: ownerId,
    name: 'Bench Site',
    latitude_deg: 50,
    longitude_deg: 8,
    elevation_m: 100,
    time_zone: 'Europe/Berlin',
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
        detector_tilt_deg: 20,
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
  const cpuOf = () => process.cpuUsage();

  const steps: Record<string, number | boolean | null>[] = [];
  let best: (typeof steps)[number] | undefined;
  for (const rate of RATES) {
    for (const c of children) c.proc.send({ type: 'rate', rate: rate / PROCS });
    await sleep(WARMUP_S);
    commitLags.length = 0;
    const c0 = committed;
    const backlog0 = published() - committed;
    const cpu0 = cpuOf();
    measuring = true;
    for (const c of children) c.proc.send({ type: 'measure', on: true });
    watcher.send({ type: 'measure', on: true });
    await sleep(WINDOW_S);
    measuring = false;
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
    const cpu = cpuOf();
    const committedRate = (committed - c0) / WINDOW_S;
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
      serverCpuPct: Math.round(((cpu.user - cpu0.user + cpu.system - cpu0.system) / 1e6 / WINDOW_S) * 100),
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
