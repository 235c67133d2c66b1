import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import mqtt, { type MqttClient } from 'mqtt';
import { sitePartition } from '../../broker/nats-auth';
import { engineSecretHash } from '../../server/services/device-secret';
import { unitTopic } from '../../shared/contracts/topics';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { testDeviceSecret } from '../helpers/device-secrets';
import { startWorkerProcess, type ServerProcess } from '../helpers/server-process';
import { sample, waitFor } from '../helpers/fake-unit';

/**
 * The small version of the scaled-out ingest: one engine node (NATS with its MQTT gateway) and two ingest workers,
 * each taking one partition of the sites and standing by for the other. Units publish to the engine; a worker killed
 * with SIGKILL loses nothing: its partition passes to the other worker and every reading is stored exactly once.
 */
const run = promisify(execFile);
const SERVICE_PASSWORD = 'engine-service-password-for-tests';
const PER_UNIT = 120;
const freePort = () =>
  new Promise<number>((res) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => res(port));
    });
  });

let testDb: TestDatabase;
let dir: string;
let engineEnv: Record<string, string>;
let mqttPort: number;
const workers: ServerProcess[] = [];
const clients: MqttClient[] = [];
/** Three units of a site in partition 0 and three of a site in partition 1. */
const units: { serial: string; id: number; partition: number }[] = [];

const engine = (cmd: 'start' | 'stop') => run('bash', ['server/scripts/engine.sh', cmd], { env: { ...process.env, ...engineEnv } });
const startWorker = async (partitions: string, standby: string) => {
  const w = await startWorkerProcess(testDb.config.db.database, {
    ...engineEnv,
    BW_WORKER_PARTITIONS: partitions,
    BW_WORKER_STANDBY: standby,
    BW_WORKER_ACK_WAIT_MS: '2000',
    // Long enough for both workers to have taken their own partition first, even on a busy machine.
    BW_WORKER_STANDBY_DELAY_MS: '8000',
    BW_INGEST_FLUSH_MS: '100',
  });
  workers.push(w);
  return w;
};
const TAKING = 'taking readings of partition';

beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
  const rows: { id: number; serial: string; site_id: number }[] = await testDb.db('units').orderBy('id').select('id', 'serial', 'site_id');
  for (const p of [0, 1]) {
    const site = rows.find((r) => sitePartition(r.site_id, 2) === p)!.site_id;
    units.push(
      ...rows
        .filter((r) => r.site_id === site)
        .slice(0, 3)
        .map((r) => ({ serial: r.serial, id: r.id, partition: p })),
    );
  }
  for (const u of units)
    await testDb
      .db('units')
      .where({ id: u.id })
      .update({ engine_secret_hash: engineSecretHash(testDeviceSecret(u.serial)) });
  dir = mkdtempSync(join(tmpdir(), 'bw-engine-workers-'));
  mqttPort = await freePort();
  const natsPort = await freePort();
  engineEnv = {
    BW_ENGINE_DIR: dir,
    BW_ENGINE_PARTITIONS: '2',
    BW_ENGINE_PORT: String(natsPort),
    BW_ENGINE_MQTT_PORT: String(mqttPort),
    BW_ENGINE_PASSWORD: SERVICE_PASSWORD,
    BW_ENGINE_URLS: `nats://127.0.0.1:${natsPort}`,
    BW_DB_NAME: testDb.config.db.database,
  };
  await engine('start');
}, 60_000);
afterAll(async () => {
  for (const c of clients) c.end(true);
  for (const w of workers) await w.kill('SIGKILL');
  if (engineEnv) await engine('stop');
  await testDb?.drop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('ingest workers on the message engine', () => {
  it('split the sites between them, and a killed worker’s partition passes to the other with every reading stored once', async () => {
    const [w0, w1] = await Promise.all([startWorker('0', '1'), startWorker('1', '0')]);
    expect((await w0.waitForLog(TAKING, 5000))['partition']).toBe(0);
    expect((await w1.waitForLog(TAKING, 5000))['partition']).toBe(1);
    // Each waits on the other's partition lock.
    expect((await w1.waitForLog('standing by for partition', 20_000))['taking']).toBe(false);
    expect((await w0.waitForLog('standing by for partition', 20_000))['taking']).toBe(false);

    const t0 = Date.now() - 30 * 60_000;
    for (const u of units) {
      const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${mqttPort}`, {
        clientId: u.serial,
        username: u.serial,
        password: testDeviceSecret(u.serial),
        reconnectPeriod: 0,
      });
      clients.push(c);
    }
    const publish = (from: number, to: number) =>
      Promise.all(
        units.map(async (u, k) => {
          for (let i = from; i < to; i++)
            await clients[k]!.publishAsync(unitTopic(u.serial, 'telemetry'), JSON.stringify(sample(i, t0 + i * 1000)), { qos: 1 });
        }),
      );
    const storedOf = async (u: (typeof units)[number]) =>
      Number(((await testDb.db('telemetry').where({ unit_id: u.id }).count({ n: '*' })) as [{ n: number }])[0].n);

    await publish(0, PER_UNIT / 2);
    await waitFor(async () => (await Promise.all(units.map(storedOf))).every((n) => n === PER_UNIT / 2), 20_000, 'first half stored');

    // Worker 0 dies; the engine keeps acknowledging the units (it holds their readings) while nobody takes partition 0.
    await w0.kill('SIGKILL');
    const killedAt = Date.now();
    const takenOver = w1.waitForLog(TAKING, 10_000, (l) => l['partition'] === 0).then(() => (Date.now() - killedAt) / 1000);
    await publish(PER_UNIT / 2, PER_UNIT);
    const takeOverS = await takenOver;
    await waitFor(async () => (await Promise.all(units.map(storedOf))).every((n) => n === PER_UNIT), 30_000, 'every reading stored');
    // Exactly once: one row per reading (seq 0 … PER_UNIT − 1), for the units of both partitions.
    for (const u of units) {
      const seqs = (await testDb.db('telemetry').where({ unit_id: u.id }).orderBy('seq').pluck('seq')).map(Number);
      expect(seqs).toEqual(Array.from({ length: PER_UNIT }, (_, i) => i));
    }
    // The database frees the dead worker's lock as its connection closes; the standby was waiting on it.
    expect(takeOverS).toBeLessThan(5);
    expect(w1.alive()).toBe(true);
  }, 90_000);
});
