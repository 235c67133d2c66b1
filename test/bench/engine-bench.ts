/**
 * `npm run bench:engine [-- --units 2000 --rates 2000,5000,10000,15000 --window 15 --json]`
 *
 * The message engine alone (one NATS 2.9 node with JetStream and its MQTT gateway, started by server/scripts/engine.sh
 * in a temporary folder): units on raw sockets publish QoS 1 telemetry from separate processes at a rising rate; the
 * engine re-publishes each below its site's worker partition into the readings stream, from which one pull consumer per
 * partition takes it as a worker does (server/consumers/engine-consumer.ts) and acknowledges it at once (no database). Per step: delivered messages/s, publish → PUBACK lag (the unit's wait), and the engine's CPU
 * per delivered message (from /proc, user + system). A step is sustained when delivery keeps up with the offered rate.
 * No database: the bench writes the engine's users itself (every unit with the same bench secret).
 */
import { execFile, fork, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs, promisify } from 'node:util';
import bcrypt from 'bcryptjs';
import { pino } from 'pino';
import { natsAuthorization } from '../../broker/nats-auth';
import { EngineConsumer } from '../../server/consumers/engine-consumer';
import { engineSecretHash } from '../../server/services/device-secret';

const { values: args } = parseArgs({
  options: {
    units: { type: 'string', default: '2000' },
    rates: { type: 'string', default: '2000,5000,10000,15000' },
    window: { type: 'string', default: '15' },
    warmup: { type: 'string', default: '5' },
    processes: { type: 'string', default: '2' },
    partitions: { type: 'string', default: '2' },
    json: { type: 'boolean', default: false },
  },
});
const UNITS = Number(args.units);
const RATES = args.rates!.split(',').map(Number);
const WINDOW_S = Number(args.window);
const WARMUP_S = Number(args.warmup);
const PROCS = Number(args.processes);
const PARTITIONS = Number(args.partitions);
const SECRET = 'bench-device-secret';
const SERVICE_PASSWORD = 'bench-service-password';
const say = (...a: unknown[]) => (args.json ? console.error(...a) : console.log(...a));
const pct = (xs: number[], p: number) => {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  return Math.round(s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]!);
};
const freePort = () =>
  new Promise<number>((res) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => res(port));
    });
  });
/** CPU seconds (user + system) of a process so far, from /proc/<pid>/stat (clock ticks of 1/100 s). */
const cpuSecondsOf = (pid: number) => {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  return (Number(fields[11]) + Number(fields[12])) / 100;
};

async function main() {
  const dir = mkdtempSync(join(tmpdir(), 'bw-engine-bench-'));
  const mqttPort = await freePort();
  const natsPort = await freePort();
  const env = {
    ...process.env,
    BW_ENGINE_DIR: dir,
    BW_ENGINE_PORT: String(natsPort),
    BW_ENGINE_MQTT_PORT: String(mqttPort),
    BW_ENGINE_PASSWORD: SERVICE_PASSWORD,
    BW_ENGINE_USERS_WRITTEN: '1',
  };
  const serials = Array.from({ length: UNITS }, (_, i) => `BENCH-${String(i).padStart(6, '0')}`);
  const hash = engineSecretHash(SECRET);
  // Ten units per site, so the partitions get an even share.
  const units = serials.map((serial, i) => ({ serial, engineSecretHash: hash, siteId: Math.floor(i / 10) + 1 }));
  writeFileSync(
    join(dir, 'units.conf'),
    natsAuthorization(units, { user: 'bw-service', passwordHash: bcrypt.hashSync(SERVICE_PASSWORD, 4) }, PARTITIONS),
  );
  const engine = (cmd: string) => promisify(execFile)('bash', ['server/scripts/engine.sh', cmd], { env });
  await engine('start');
  const children: ChildProcess[] = [];
  let closeConsumer = async () => undefined as void;
  try {
    const pid = Number(readFileSync(join(dir, 'n1.pid'), 'utf8'));
    let delivered = 0;
    const consumer = new EngineConsumer(
      (_serial, _leaf, _payload, ack) => {
        delivered++;
        ack();
      },
      pino({ level: 'silent' }),
      { urls: [`nats://127.0.0.1:${natsPort}`], user: 'bw-service', password: SERVICE_PASSWORD },
    );
    await consumer.open();
    for (let p = 0; p < PARTITIONS; p++) await consumer.start(p);
    closeConsumer = () => consumer.close();
    const counts: { published: number; acked: number; lags?: (l: number[]) => void }[] = [];
    const script = fileURLToPath(new URL('./unit-load.ts', import.meta.url));
    say(`connecting ${UNITS} units from ${PROCS} processes…`);
    await Promise.all(
      Array.from({ length: PROCS }, (_, p) => {
        const proc = fork(script, [String(mqttPort), SECRET, ...serials.filter((_, i) => i % PROCS === p)], {
          execArgv: ['--import', 'tsx'],
          stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
        });
        children.push(proc);
        const c: (typeof counts)[number] = { published: 0, acked: 0 };
        counts.push(c);
        return new Promise<void>((res, rej) => {
          proc.on('message', (m: { type: string; published?: number; acked?: number; lags?: number[] }) => {
            if (m.type === 'ready') res();
            if (m.type === 'counts') Object.assign(c, { published: m.published, acked: m.acked });
            if (m.type === 'ackLags') c.lags?.(m.lags!);
          });
          proc.once('exit', (code) => rej(new Error(`load process exited with ${code}`)));
        });
      }),
    );
    const sleep = (s: number) => new Promise((r) => setTimeout(r, s * 1000));
    const steps: Record<string, number | boolean | null>[] = [];
    let best: (typeof steps)[number] | undefined;
    for (const rate of RATES) {
      for (const c of children) c.send({ type: 'rate', rate: rate / PROCS });
      await sleep(WARMUP_S);
      const d0 = delivered;
      const cpu0 = cpuSecondsOf(pid);
      for (const c of children) c.send({ type: 'measure', on: true });
      await sleep(WINDOW_S);
      const d1 = delivered;
      const cpu1 = cpuSecondsOf(pid);
      const lags = (
        await Promise.all(
          children.map(
            (c, i) =>
              new Promise<number[]>((res) => {
                counts[i]!.lags = res;
                c.send({ type: 'measure', on: false });
              }),
          ),
        )
      ).flat();
      const deliveredRate = (d1 - d0) / WINDOW_S;
      const step = {
        offeredMsgsPerSec: rate,
        deliveredMsgsPerSec: Math.round(deliveredRate),
        p50PublishToAckMs: pct(lags, 50),
        p99PublishToAckMs: pct(lags, 99),
        engineCpuPct: Math.round(((cpu1 - cpu0) / WINDOW_S) * 100),
        engineCpuUsPerMsg: d1 > d0 ? Math.round(((cpu1 - cpu0) * 1e6) / (d1 - d0)) : null,
        sustained: deliveredRate >= rate * 0.97,
      };
      steps.push(step);
      say(JSON.stringify(step));
      if (step.sustained) best = step;
      else break;
    }
    const published = counts.reduce((s, c) => s + c.published, 0);
    const acked = counts.reduce((s, c) => s + c.acked, 0);
    const result = {
      engine: 'nats-2.9-mqtt-jetstream',
      engineNodes: 1,
      units: UNITS,
      partitions: PARTITIONS,
      sustainedMsgsPerSec: best?.deliveredMsgsPerSec ?? 0,
      engineCpuUsPerMsg: best?.engineCpuUsPerMsg ?? null,
      p99PublishToAckMs: best?.p99PublishToAckMs ?? null,
      published,
      acked,
      steps,
    };
    console.log(args.json ? JSON.stringify(result) : result);
  } finally {
    for (const c of children) c.kill('SIGTERM');
    await closeConsumer().catch(() => undefined);
    await engine('stop').catch(() => undefined);
    rmSync(dir, { recursive: true, force: true });
  }
  process.exit(0);
}

void main();
