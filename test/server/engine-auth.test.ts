import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import mqtt, { type MqttClient } from 'mqtt';
import { pino } from 'pino';
import { natsAuthorization, natsSubject, sitePartition } from '../../broker/nats-auth';
import { engineSecretHash } from '../../server/services/device-secret';
import { EngineAuth } from '../../server/services/engine-auth';
import { startStack, type Stack } from '../../server/stack';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { testDeviceSecret } from '../helpers/device-secrets';
import { signedIn } from '../helpers/signed-in';
import { waitFor } from '../helpers/fake-unit';
import { unitTopic } from '../../shared/contracts/topics';

const run = promisify(execFile);
const SERVICE_PASSWORD = 'engine-service-password-for-tests';
const UNIT = 'QED-2405';
const OTHER = 'QED-2406';

/** A port nothing listens on now (the engine's ports are fixed in its configuration). */
const freePort = () =>
  new Promise<number>((res) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => res(port));
    });
  });

let testDb: TestDatabase;
let stack: Stack;
let dir: string;
let mqttPort: number;
let engineEnv: Record<string, string>;
const clients: MqttClient[] = [];

const engine = (cmd: 'start' | 'stop') => run('bash', ['server/scripts/engine.sh', cmd], { env: { ...process.env, ...engineEnv } });
const connect = async (username: string, password: string, clientId = username) => {
  const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${mqttPort}`, {
    clientId,
    username,
    password,
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  clients.push(c);
  return c;
};
const service = async () => connect('bw-service', SERVICE_PASSWORD, `bw-service-${clients.length}`);

beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
  // Seeded test units carry no engine hash (it is only made where the engine is used): give two of them one.
  for (const serial of [UNIT, OTHER])
    await testDb
      .db('units')
      .where({ serial })
      .update({ engine_secret_hash: engineSecretHash(testDeviceSecret(serial)) });
  dir = mkdtempSync(join(tmpdir(), 'bw-engine-'));
  mqttPort = await freePort();
  engineEnv = {
    BW_ENGINE_DIR: dir,
    BW_ENGINE_PARTITIONS: '2',
    BW_ENGINE_PORT: String(await freePort()),
    BW_ENGINE_MQTT_PORT: String(mqttPort),
    BW_ENGINE_PASSWORD: SERVICE_PASSWORD,
    BW_DB_NAME: testDb.config.db.database,
  };
  await engine('start');
  stack = await startStack(
    {
      ...testDb.config,
      port: 0,
      broker: { host: '127.0.0.1', port: 0 },
      sessionSecret: 'test-secret-test-secret-test-secret-0',
      engine: {
        dir,
        service: { user: 'bw-service', password: SERVICE_PASSWORD },
        partitions: 2,
        urls: [],
        replicas: 1,
      },
    },
    pino({ level: 'silent' }),
    { warmLandscapes: false, statements: { autoLock: false } },
  );
}, 60_000);
// Each test ends its connections: the gateway refuses a client id taken over again within a second (flapping).
afterEach(async () => {
  await Promise.all(clients.splice(0).map((c) => c.endAsync(true)));
});
afterAll(async () => {
  await stack?.stop();
  if (engineEnv) await engine('stop');
  await testDb?.drop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('engine users from the unit table', () => {
  it('confines each unit to its own publish leaves and its own prefix, and checks bcrypt hashes only', () => {
    const hash = engineSecretHash('s');
    const text = natsAuthorization([{ serial: UNIT, engineSecretHash: hash, siteId: 1 }], { user: 'bw-service', passwordHash: hash });
    expect(text).toContain(
      `{ user: "${UNIT}", password: "${hash}", permissions: { publish: { allow: ["bw.v1.units.${UNIT}.telemetry", "bw.v1.units.${UNIT}.events", "bw.v1.units.${UNIT}.acks", "bw.v1.units.${UNIT}.status", "bw.v1.units.${UNIT}.weather"] }, subscribe: { allow: ["bw.v1.units.${UNIT}.>", "$MQTT.sub.>"] } } }`,
    );
    expect(() =>
      natsAuthorization([{ serial: 'bad serial"', engineSecretHash: hash, siteId: 1 }], { user: 's', passwordHash: hash }),
    ).toThrow(/not a unit serial/);
    expect(() =>
      natsAuthorization([{ serial: UNIT, engineSecretHash: 'sha256:00', siteId: 1 }], { user: 's', passwordHash: hash }),
    ).toThrow(/not a bcrypt hash/);
    expect(natsSubject(unitTopic(UNIT, 'telemetry'))).toBe(`bw.v1.units.${UNIT}.telemetry`);
    // With worker partitions the unit's readings are re-published below its site's partition (site 3 of 2 → 1).
    const mapped = natsAuthorization([{ serial: UNIT, engineSecretHash: hash, siteId: 3 }], { user: 's', passwordHash: hash }, 2);
    expect(mapped).toContain(`  "bw.v1.units.${UNIT}.telemetry": "bw.s.1.v1.units.${UNIT}.telemetry"`);
    expect(mapped).toContain(`  "bw.v1.units.${UNIT}.status": "bw.s.1.v1.units.${UNIT}.status"`);
    expect(mapped).not.toContain(`"bw.v1.units.${UNIT}.commands":`);
    expect(mapped).not.toContain(`"bw.v1.units.${UNIT}.acks":`);
    // The engine checks the mapped subject: the unit may publish there (its own serial only), and its acks as before.
    expect(mapped).toContain(
      `publish: { allow: ["bw.s.1.v1.units.${UNIT}.telemetry", "bw.s.1.v1.units.${UNIT}.events", "bw.v1.units.${UNIT}.acks", "bw.s.1.v1.units.${UNIT}.status", "bw.s.1.v1.units.${UNIT}.weather"] }`,
    );
  });

  it('rewrites once for a burst of changes that arrive while a write is under way', async () => {
    const scratch = mkdtempSync(join(tmpdir(), 'bw-engine-auth-'));
    let reads = 0;
    const auth = new EngineAuth(
      {
        engineCredentials: async () => {
          reads++;
          await new Promise((r) => setTimeout(r, 50));
          return [{ serial: UNIT, engineSecretHash: engineSecretHash('s'), siteId: 1 }];
        },
      },
      scratch,
      { user: 'bw-service', password: SERVICE_PASSWORD },
      pino({ level: 'silent' }),
    );
    const first = auth.write();
    await waitFor(() => reads === 1, 2000);
    // Four changes while the first write reads the table: one more write covers them all.
    const results = await Promise.all([first, auth.write(), auth.write(), auth.write(), auth.write()]);
    expect(reads).toBe(2);
    expect(results.map((r) => r.units)).toEqual([1, 1, 1, 1, 1]);
    rmSync(scratch, { recursive: true, force: true });
  });

  it('lets only units with an engine secret in, and the service user', () => {
    const text = readFileSync(join(dir, 'units.conf'), 'utf8');
    expect(text.match(/user: "[^"]+"/g)).toEqual(['user: "bw-service"', `user: "${UNIT}"`, `user: "${OTHER}"`]);
  });
});

describe('units on the engine MQTT gateway (NATS 2.9)', () => {
  it('connect unchanged with serial and device secret; a wrong secret is refused', async () => {
    const u = await connect(UNIT, testDeviceSecret(UNIT));
    expect(u.connected).toBe(true);
    await expect(connect(UNIT, 'not-the-secret', `${UNIT}-x`)).rejects.toThrow(/Not authorized|Bad User Name or Password/);
  });

  it('publish their own readings to the service; what they publish under another prefix or to commands reaches no one', async () => {
    const srv = await service();
    const got: string[] = [];
    srv.on('message', (topic, payload) => got.push(`${topic} ${String(payload)}`));
    await srv.subscribeAsync('bw/v1/units/#', { qos: 1 });
    await srv.subscribeAsync('bw/s/#', { qos: 1 });
    const u = await connect(UNIT, testDeviceSecret(UNIT), `${UNIT}`);
    await u.publishAsync(unitTopic(UNIT, 'telemetry'), 'own', { qos: 1 });
    await u.publishAsync(unitTopic(OTHER, 'telemetry'), 'forged', { qos: 1 });
    await u.publishAsync(unitTopic(UNIT, 'commands'), 'self-command', { qos: 1 });
    await u.publishAsync(unitTopic(UNIT, 'events'), 'last', { qos: 1 });
    await waitFor(() => got.some((g) => g.endsWith(' last')), 5000);
    // Readings come out below the partition of the unit's site (BW_ENGINE_PARTITIONS=2), for the ingest workers.
    const p = sitePartition(stack.units.get(UNIT)!.siteId, 2);
    expect(got).toEqual([`bw/s/${p}/v1/units/${UNIT}/telemetry own`, `bw/s/${p}/v1/units/${UNIT}/events last`]);
  });

  it('subscribe to their own commands but not to another unit’s', async () => {
    const u = await connect(UNIT, testDeviceSecret(UNIT), `${UNIT}`);
    await expect(u.subscribeAsync(unitTopic(UNIT, 'commands'), { qos: 1 })).resolves.toEqual([
      { topic: unitTopic(UNIT, 'commands'), qos: 1 },
    ]);
    const refused = await u
      .subscribeAsync(unitTopic(OTHER, 'commands'), { qos: 1 })
      .catch((e: { packet?: { granted?: number[] } }) => e.packet?.granted);
    expect(refused).toEqual([128]);
    const got: string[] = [];
    u.on('message', (topic, payload) => got.push(`${topic} ${String(payload)}`));
    const srv = await service();
    await srv.publishAsync(unitTopic(OTHER, 'commands'), 'for-the-other', { qos: 1 });
    await srv.publishAsync(unitTopic(UNIT, 'commands'), 'for-me', { qos: 1 });
    await waitFor(() => got.length > 0, 5000);
    await new Promise((r) => setTimeout(r, 200));
    expect(got).toEqual([`${unitTopic(UNIT, 'commands')} for-me`]);
  });

  it('a unit an admin disables is shut out at once: the engine reloads its users before the request answers', async () => {
    const u = await connect(OTHER, testDeviceSecret(OTHER));
    const closed = new Promise<void>((res) => u.once('close', () => res()));
    const admin = await signedIn(() => stack.http)('admin@saltmarsh.example');
    const id = stack.units.get(OTHER)!.id;
    await admin.agent.patch(`/api/units/${id}`).send({ disabled: true }).expect(200);
    expect(readFileSync(join(dir, 'units.conf'), 'utf8')).not.toContain(`"${OTHER}"`);
    await closed;
    await expect(connect(OTHER, testDeviceSecret(OTHER), `${OTHER}-again`)).rejects.toThrow(/Not authorized|Bad User Name or Password/);
  });
});
