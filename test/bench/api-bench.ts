/**
 * `npm run bench:api [-- --users 50 --units 2000 --period 2000 --duration 60 --json]`
 *
 * Signed-in dashboard users (a separate process, api-users.ts), each opening one view every `--period` ms in turn —
 * fleet board, alarms, a unit view, a day of traces — with their live sockets open, while `--units` units report once a
 * second each (unit-load.ts, another process) into the server (this process). Every traced unit has a day of 5-second
 * history. Prints p95/p99 request latency, p99 socket lag (receive − report time) and errors; with --json the last
 * line is `{ users, requests, p95Ms, p99Ms, socketLagP99Ms, errors }`.
 */
import { fork } from 'node:child_process';
import { writeFileSync, mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { pino } from 'pino';
import bcrypt from 'bcryptjs';
import { loadConfig } from '../../server/config';
import { startStack } from '../../server/stack';
import { createTestDatabase } from '../helpers/test-db';
import { insertDayOfTelemetry } from '../e2e/demo-data';
import { hashDeviceSecret } from '../../server/services/device-secret';

const { values: args } = parseArgs({
  options: {
    users: { type: 'string', default: '50' },
    units: { type: 'string', default: '2000' },
    sites: { type: 'string', default: '10' },
    period: { type: 'string', default: '2000' },
    duration: { type: 'string', default: '60' },
    warmup: { type: 'string', default: '10' },
    json: { type: 'boolean', default: false },
  },
});
const USERS = Number(args.users);
const UNITS = Number(args.units);
const SITES = Number(args.sites);
const SECRET = 'bench-device-secret';
const PASSWORD = 'bench-password';
const say = (...a: unknown[]) => (args.json ? console.error(...a) : console.log(...a));
const pct = (xs: number[], p: number) => {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  return Math.round(s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]! * 10) / 10;
};

async function main() {
  const testDb = await createTestDatabase({ env: { BW_LOG_LEVEL: 'silent' } });
  const { db } = testDb;
  // SITES sites of one owner each; the users are technicians and engineers (the roles that open all four views).
  const sites: { id: number; ownerId: number; unitIds: number[] }[] = [];
  const serials: string[] = [];
  const hash = hashDeviceSecret(SECRET);
  for (let s = 0; s < SITES; s++) {
    const [ownerId] = await db('owners').insert({ name: `Bench Owner ${s}` });
    const [siteId] = await db('sites').insert({
      owner_id: ownerId,
      name: `Bench Site ${s}`,
      latitude_deg: 50,
      longitude_deg: 8 + s,
      elevation_m: 100,
      time_zone: 'Europe/Berlin',
      albedo: 0.2,
    });
    const mine = Array.from(
      { length: Math.ceil(UNITS / SITES) },
      (_, i) => `BA-${String(s).padStart(2, '0')}-${String(i).padStart(4, '0')}`,
    );
    await db('units').insert(
      mine.map((serial) => ({
        serial,
        site_id: siteId,
        rated_power_wp: 400,
        detector_tilt_deg: 20,
        firmware: '2.4.1',
        device_secret_hash: hash,
      })),
    );
    const unitIds: number[] = await db('units').where({ site_id: siteId }).orderBy('id').pluck('id');
    sites.push({ id: siteId!, ownerId: ownerId!, unitIds });
    serials.push(...mine);
  }
  const passwordHash = await bcrypt.hash(PASSWORD, 4);
  const users = Array.from({ length: USERS }, (_, i) => {
    const site = sites[i % SITES]!;
    const role = i % 2 ? 'engineer' : 'technician';
    return { email: `user${i}@bench.example`, role, site, unitId: site.unitIds[Math.floor(i / SITES) % site.unitIds.length]! };
  });
  await db('users').insert(
    users.map((u) => ({
      email: u.email,
      name: u.email,
      role: u.role,
      owner_id: u.role === 'owner' ? u.site.ownerId : null,
      password_hash: passwordHash,
    })),
  );
  // A day of history for every unit a user will trace (written before the live reports start).
  const dayStart = Date.now() - 86_400_000;
  say(`writing a day of history for ${new Set(users.map((u) => u.unitId)).size} units…`);
  for (const id of new Set(users.map((u) => u.unitId))) await insertDayOfTelemetry(db, id, dayStart - 60_000);

  const base = loadConfig({ ...process.env, BW_LOG_LEVEL: 'silent' });
  const stack = await startStack(
    {
      ...testDb.config,
      port: 0,
      signInLimitPerMinute: USERS * 2,
      broker: { ...base.broker, port: 0 },
      db: { ...testDb.config.db, poolMax: 8 },
    },
    pino({ level: 'warn' }),
  );

  mkdirSync('.data/bench', { recursive: true });
  const usersFile = '.data/bench/api-users.json';
  writeFileSync(usersFile, JSON.stringify(users.map((u) => ({ email: u.email, password: PASSWORD, unitId: u.unitId, siteId: u.site.id }))));

  const warm0 = Date.now();
  await stack.landscapesWarm;
  say(`modelled best of the last day cached for ${SITES} sites in ${((Date.now() - warm0) / 1000).toFixed(1)} s`);
  say(`connecting ${UNITS} units…`);
  const load = fork(fileURLToPath(new URL('./unit-load.ts', import.meta.url)), [String(stack.broker.port), SECRET, ...serials], {
    execArgv: ['--import', 'tsx'],
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
  });
  await new Promise<void>((res, rej) => {
    load.on('message', (m: { type: string }) => m.type === 'ready' && res());
    load.once('exit', (code) => rej(new Error(`unit load exited with ${code}`)));
  });
  load.send({ type: 'rate', rate: UNITS });

  const warmupS = Number(args.warmup);
  const durationS = Number(args.duration);
  say(`${USERS} users for ${durationS} s after ${warmupS} s warm-up, ${UNITS} units reporting once a second…`);
  const cpu0 = process.cpuUsage();
  // The server's event-loop delay: a stall shows in every route's tail at once.
  const loopDelay = monitorEventLoopDelay({ resolution: 10 });
  setTimeout(() => loopDelay.enable(), warmupS * 1000);
  const usersProc = fork(
    fileURLToPath(new URL('./api-users.ts', import.meta.url)),
    [stack.url, args.period!, String(warmupS + durationS), usersFile],
    { execArgv: ['--import', 'tsx'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] },
  );
  setTimeout(() => usersProc.send({ type: 'measure' }), warmupS * 1000);
  const result = await new Promise<{ latencies: number[]; socketLags: number[]; errors: string[]; byRoute: Record<string, number[]> }>(
    (res, rej) => {
      usersProc.on(
        'message',
        (m: { type: string; latencies: number[]; socketLags: number[]; errors: string[]; byRoute: Record<string, number[]> }) =>
          m.type === 'done' && res(m),
      );
      usersProc.once('exit', (code) => code !== 0 && rej(new Error(`users exited with ${code}`)));
    },
  );
  const cpu = process.cpuUsage(cpu0);
  loopDelay.disable();
  load.send({ type: 'stop' });
  await new Promise((r) => load.once('exit', r));
  await stack.stop();
  await testDb.drop();

  const out = {
    users: USERS,
    requests: result.latencies.length,
    p95Ms: pct(result.latencies, 95),
    p99Ms: pct(result.latencies, 99),
    socketLagP99Ms: pct(result.socketLags, 99),
    errors: result.errors.length,
  };
  say({
    ...out,
    p50Ms: pct(result.latencies, 50),
    socketLagP50Ms: pct(result.socketLags, 50),
    loopDelayP99Ms: Math.round(loopDelay.percentile(99) / 1e6),
    loopDelayMaxMs: Math.round(loopDelay.max / 1e6),
    serverCpuPct: Math.round(((cpu.user + cpu.system) / 1e6 / (warmupS + durationS)) * 100),
    firstErrors: result.errors.slice(0, 5),
  });
  if (!args.json)
    console.table(
      Object.fromEntries(
        Object.entries(result.byRoute).map(([r, xs]) => [r, { n: xs.length, p50Ms: pct(xs, 50), p95Ms: pct(xs, 95), maxMs: pct(xs, 100) }]),
      ),
    );
  if (args.json) console.log(JSON.stringify(out));
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
