/**
 * `npm run chaos [-- --units 500 --rate 2000 --steady 20 --outage 30 --scenarios kill-9-server,db-outage-30s,broker-restart --json]`
 *
 * Breaks the running product on purpose while units report, and counts what happened to every reading:
 *   kill-9-server   SIGKILL the server process (it holds the broker and the ingest), start it again
 *   db-outage-30s   MariaDB stopped for `--outage` seconds, started again
 *   broker-restart  the server process stopped gracefully and started again
 * Units store and forward (chaos-units.ts): unacknowledged readings are sent again after a reconnect.
 * sent = readings the units made; acked = readings a unit got a PUBACK for; stored = rows in MariaDB; lost = acked
 * readings not stored; duplicated = a reading counted twice anywhere: rows, rollup samples, live pushes on one socket
 * connection, or a second open alarm of the same unit and kind.
 * The server runs as its own process against a private MariaDB (port BW_CHAOS_DB_PORT, default 3310) that this script
 * starts and stops. With --json the last stdout line is `{ "scenarios": [ { name, sent, acked, stored, lost, duplicated } ] }`.
 */
import { fork, spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createWriteStream, mkdirSync, readFileSync } from 'node:fs';
import { createServer, type AddressInfo } from 'node:net';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import knexFactory from 'knex';
import bcrypt from 'bcryptjs';
import WebSocket from 'ws';
import { createDb, migrateLatest } from '../../server/data/db';
import { hashDeviceSecret } from '../../server/services/device-secret';
import type { LiveServerMessage } from '../../shared/contracts/live';

export const CHAOS_SCENARIOS = ['kill-9-server', 'db-outage-30s', 'broker-restart'] as const;
export type ChaosScenario = (typeof CHAOS_SCENARIOS)[number];

export interface ChaosOptions {
  units: number;
  /** Aggregate readings per second. */
  rate: number;
  /** Seconds of steady load before and after the disruption. */
  steadyS: number;
  /** How long the database stays down in db-outage-30s [s]. */
  outageS: number;
  scenarios: ChaosScenario[];
  dbPort: number;
  log?: (line: string) => void;
}

export interface ChaosResult {
  name: ChaosScenario;
  sent: number;
  acked: number;
  stored: number;
  lost: number;
  duplicated: number;
  detail: {
    duplicateRows: number;
    duplicateRollupSamples: number;
    duplicatePushes: number;
    duplicateAlarms: number;
    undelivered: number;
    downS: number;
  };
}

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const SECRET = 'chaos-device-secret';
const PASSWORD = 'chaos-password';
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function dbEnv(port: number): Record<string, string> {
  return {
    BW_DB_DIR: `.data/mariadb-chaos-${port}`,
    BW_DB_PORT: String(port),
    BW_DB_HOST: '127.0.0.1',
    BW_DB_USER: 'bw_chaos',
    BW_DB_PASSWORD: 'bw-chaos-only',
    BW_DB_NAME: 'bw_chaos',
    BW_DB_SUPER: '1',
  };
}

function db(cmd: 'start' | 'stop', port: number): void {
  const r = spawnSync('bash', ['server/scripts/db.sh', cmd], { cwd: ROOT, env: { ...process.env, ...dbEnv(port) }, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`db.sh ${cmd} failed: ${r.stderr}`);
}

async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const { port } = s.address() as AddressInfo;
  await new Promise((r) => s.close(r));
  return port;
}

async function prepareDatabase(name: string, port: number, units: number): Promise<{ serials: string[]; unitIds: Map<number, string> }> {
  const env = dbEnv(port);
  const admin = knexFactory({
    client: 'mysql2',
    connection: { host: '127.0.0.1', port, user: env.BW_DB_USER, password: env.BW_DB_PASSWORD },
  });
  await admin.raw(`DROP DATABASE IF EXISTS \`${name}\``);
  await admin.raw(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.destroy();
  const k = createDb({ host: '127.0.0.1', port, user: env.BW_DB_USER!, password: env.BW_DB_PASSWORD!, database: name, poolMax: 2 });
  await migrateLatest(k);
  const [ownerId] = await k('owners').insert({ name: 'Chaos Owner' });
  const [siteId] = await k('sites').insert({
    owner_id: ownerId,
    name: 'Chaos Site',
    latitude_deg: 50,
    longitude_deg: 8,
    elevation_m: 100,
    time_zone: 'Europe/Berlin',
    albedo: 0.2,
  });
  const serials = Array.from({ length: units }, (_, i) => `CH-${String(i).padStart(5, '0')}`);
  const hash = hashDeviceSecret(SECRET);
  for (let i = 0; i < serials.length; i += 1000) {
    await k('units').insert(
      serials.slice(i, i + 1000).map((serial) => ({
        serial,
        site_id: siteId,
        rated_power_wp: 400,
        detector_tilt_deg: 20,
        firmware: '2.4.1',
        device_secret_hash: hash,
      })),
    );
  }
  await k('users').insert({
    email: 'chaos@chaos.example',
    name: 'Chaos Watcher',
    role: 'technician',
    password_hash: await bcrypt.hash(PASSWORD, 4),
  });
  const rows: { id: number; serial: string }[] = await k('units').select('id', 'serial');
  await k.destroy();
  return { serials, unitIds: new Map(rows.map((r) => [r.id, r.serial])) };
}

/** The server as its own process (what npm start runs), on fixed ports so units and the socket find it again. */
class ServerProcess {
  private proc: ChildProcess | undefined;
  constructor(
    private readonly env: Record<string, string>,
    private readonly url: string,
    private readonly logFile: string,
  ) {}

  async start(): Promise<void> {
    const out = createWriteStream(this.logFile, { flags: 'a' });
    const proc = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
      cwd: ROOT,
      env: { ...process.env, ...this.env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    proc.stdout!.pipe(out);
    proc.stderr!.pipe(out);
    this.proc = proc;
    const deadline = Date.now() + 60_000;
    while (Date.now() < deadline) {
      if (proc.exitCode !== null) throw new Error(`server exited with ${proc.exitCode}; see ${this.logFile}`);
      try {
        if ((await fetch(`${this.url}/api/health`)).ok) return;
      } catch {
        /* not listening yet */
      }
      await sleep(100);
    }
    throw new Error(`server not healthy within 60 s; see ${this.logFile}`);
  }

  async stop(signal: 'SIGTERM' | 'SIGKILL'): Promise<void> {
    const p = this.proc;
    if (!p || p.exitCode !== null) return;
    const exited = new Promise((r) => p.once('exit', r));
    p.kill(signal);
    await exited;
  }
}

/** A dashboard's live socket that reconnects; counts a reading pushed twice on one connection. */
function watchFleet(baseUrl: string, cookie: () => Promise<string>) {
  let stopped = false;
  let duplicates = 0;
  let ws: WebSocket | undefined;
  const open = async () => {
    if (stopped) return;
    let c: string;
    try {
      c = await cookie();
    } catch {
      setTimeout(() => void open(), 500);
      return;
    }
    const seen = new Set<string>();
    ws = new WebSocket(`${baseUrl.replace('http', 'ws')}/ws`, { headers: { Cookie: c } });
    ws.on('open', () => ws!.send(JSON.stringify({ type: 'subscribe', fleet: true })));
    ws.on('message', (d) => {
      const m = JSON.parse(String(d)) as LiveServerMessage;
      if (m.type !== 'units') return;
      for (const u of m.units) {
        const key = `${u.unitId}|${u.lastReportAt}`;
        if (seen.has(key)) duplicates++;
        seen.add(key);
      }
    });
    ws.on('error', () => undefined);
    ws.on('close', () => setTimeout(() => void open(), 500));
  };
  void open();
  return {
    get duplicates() {
      return duplicates;
    },
    stop: () => {
      stopped = true;
      ws?.removeAllListeners('close');
      ws?.close();
    },
  };
}

async function runScenario(name: ChaosScenario, o: ChaosOptions): Promise<ChaosResult> {
  const say = o.log ?? (() => undefined);
  const database = `bw_chaos_${name.replace(/-/g, '_')}`;
  const { serials, unitIds } = await prepareDatabase(database, o.dbPort, o.units);
  const [httpPort, brokerPort] = [await freePort(), await freePort()];
  const url = `http://127.0.0.1:${httpPort}`;
  mkdirSync(`${ROOT}.data/chaos`, { recursive: true });
  const server = new ServerProcess(
    {
      ...dbEnv(o.dbPort),
      BW_DB_NAME: database,
      BW_PORT: String(httpPort),
      BW_BROKER_PORT: String(brokerPort),
      BW_SESSION_SECRET: 'chaos-session-secret-chaos-session-secret',
      BW_LOG_LEVEL: 'warn',
      BW_BCRYPT_COST: '4',
    },
    url,
    `${ROOT}.data/chaos/${name}-server.log`,
  );
  await server.start();
  say(`${name}: server up on ${url}, broker ${brokerPort}`);

  let sessionCookie: string | undefined;
  const cookie = async () => {
    if (sessionCookie) return sessionCookie;
    const res = await fetch(`${url}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'chaos@chaos.example', password: PASSWORD }),
    });
    if (!res.ok) throw new Error(`sign-in ${res.status}`);
    return (sessionCookie = res.headers.get('set-cookie')!.split(';')[0]!);
  };
  const watcher = watchFleet(url, cookie);

  const ackFile = `${ROOT}.data/chaos/${name}-acked.txt`;
  const units = fork(fileURLToPath(new URL('./chaos-units.ts', import.meta.url)), [String(brokerPort), SECRET, ackFile, '10', ...serials], {
    execArgv: ['--import', 'tsx'],
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
  });
  let counts = { sent: 0, acked: 0, connected: 0 };
  let done: { sent: number; acked: number; undelivered: number } | undefined;
  units.on('message', (m: { type: string; sent: number; acked: number; connected: number; undelivered: number }) => {
    if (m.type === 'counts') counts = m;
    if (m.type === 'done') done = m;
  });
  await new Promise<void>((res, rej) => {
    units.on('message', (m: { type: string }) => m.type === 'ready' && res());
    units.once('exit', (code) => code !== 0 && rej(new Error(`units exited with ${code}`)));
  });
  units.send({ type: 'rate', rate: o.rate });
  await sleep(o.steadyS * 1000);

  const down0 = Date.now();
  say(`${name}: disrupting at sent=${counts.sent} acked=${counts.acked}`);
  if (name === 'kill-9-server') {
    await server.stop('SIGKILL');
    await sleep(1000);
    await server.start();
  } else if (name === 'broker-restart') {
    await server.stop('SIGTERM');
    await server.start();
  } else {
    db('stop', o.dbPort);
    await sleep(o.outageS * 1000);
    db('start', o.dbPort);
  }
  const downS = (Date.now() - down0) / 1000;
  say(`${name}: back after ${downS.toFixed(1)} s; sent=${counts.sent} acked=${counts.acked} connected=${counts.connected}`);
  await sleep(o.steadyS * 1000);

  units.send({ type: 'finish', timeoutMs: 120_000 });
  while (!done) await sleep(100);
  await new Promise((r) => (units.exitCode !== null ? r(null) : units.once('exit', r)));
  watcher.stop();
  // A graceful stop drains the ingest and closes the open rollup minutes.
  await server.stop('SIGTERM');

  const k = createDb({ host: '127.0.0.1', port: o.dbPort, user: 'bw_chaos', password: 'bw-chaos-only', database, poolMax: 2 });
  const rows: { unit_id: number; ts: Date }[] = await k('telemetry').select('unit_id', 'ts');
  const [{ samples }] = (await k('telemetry_1m').sum({ samples: 'samples' })) as [{ samples: number | string | null }];
  const dupAlarms = (
    await k('alarms')
      .whereNull('cleared_at')
      .whereNotNull('unit_id')
      .select('unit_id', 'kind')
      .count({ n: '*' })
      .groupBy('unit_id', 'kind')
      .having(k.raw('COUNT(*) > 1'))
  ).length;
  await k.raw(`DROP DATABASE \`${database}\``);
  await k.destroy();

  const stored = new Set(rows.map((r) => `${unitIds.get(r.unit_id)} ${r.ts.getTime()}`));
  const acked = readFileSync(ackFile, 'utf8').split('\n').filter(Boolean);
  const lost = acked.filter((a) => !stored.has(a)).length;
  const duplicateRows = rows.length - stored.size;
  const duplicateRollupSamples = Math.max(0, Number(samples ?? 0) - rows.length);
  return {
    name,
    sent: done.sent,
    acked: acked.length,
    stored: rows.length,
    lost,
    duplicated: duplicateRows + duplicateRollupSamples + watcher.duplicates + dupAlarms,
    detail: {
      duplicateRows,
      duplicateRollupSamples,
      duplicatePushes: watcher.duplicates,
      duplicateAlarms: dupAlarms,
      undelivered: done.undelivered,
      downS: Math.round(downS * 10) / 10,
    },
  };
}

export async function runChaos(o: ChaosOptions): Promise<{ scenarios: ChaosResult[] }> {
  db('start', o.dbPort);
  const scenarios: ChaosResult[] = [];
  try {
    for (const name of o.scenarios) scenarios.push(await runScenario(name, o));
  } finally {
    db('stop', o.dbPort);
  }
  return { scenarios };
}

if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) {
  const { values } = parseArgs({
    options: {
      units: { type: 'string', default: '500' },
      rate: { type: 'string', default: '2000' },
      steady: { type: 'string', default: '20' },
      outage: { type: 'string', default: '30' },
      scenarios: { type: 'string', default: CHAOS_SCENARIOS.join(',') },
      json: { type: 'boolean', default: false },
    },
  });
  const scenarios = values.scenarios!.split(',') as ChaosScenario[];
  const bad = scenarios.filter((s) => !CHAOS_SCENARIOS.includes(s));
  if (bad.length) {
    console.error(`unknown scenario(s): ${bad.join(', ')}; choose from ${CHAOS_SCENARIOS.join(', ')}`);
    process.exit(2);
  }
  const log = (l: string) => (values.json ? console.error(l) : console.log(l));
  runChaos({
    units: Number(values.units),
    rate: Number(values.rate),
    steadyS: Number(values.steady),
    outageS: Number(values.outage),
    scenarios,
    dbPort: Number(process.env['BW_CHAOS_DB_PORT'] ?? 3310),
    log,
  }).then(
    (r) => {
      if (values.json) console.log(JSON.stringify({ scenarios: r.scenarios.map(({ detail, ...s }) => ({ ...s, detail })) }));
      else console.table(r.scenarios.map(({ detail, ...s }) => ({ ...s, ...detail })));
      process.exit(r.scenarios.every((s) => s.lost === 0 && s.duplicated === 0) ? 0 : 1);
    },
    (err) => {
      console.error(err);
      process.exit(1);
    },
  );
}
