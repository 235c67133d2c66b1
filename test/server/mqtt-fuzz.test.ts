/**
 * MQTT fuzz: malformed, oversized, wrong-topic and wrong-schema packets and a storm of connects and disconnects, from
 * raw sockets (hand-built and garbled packets) and from authenticated units, while good units keep reporting. The
 * server must not crash, must stay within 150 MB of its idle resident memory, must count every bad message by its
 * reason, and must store every good reading.
 *
 * `npm test` runs 10,000 bad messages; `npm run fuzz:mqtt` runs BW_FUZZ_SCALE (default there 10) times as many.
 */
import { afterAll, beforeAll, describe, expect, it, onTestFinished } from 'vitest';
import mqttPacket from 'mqtt-packet';
import { unitTopic } from '../../shared/contracts/topics';
import { testDeviceSecret } from '../helpers/device-secrets';
import type { BrokerCounters } from '../../broker/broker';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { rawConnect, rawSocket, qos1, type RawClient } from '../helpers/raw-mqtt';
import { sample, waitFor } from '../helpers/fake-unit';
import { seededRandom } from '../shared/seeded-random';

const SCALE = Math.max(1, Number(process.env['BW_FUZZ_SCALE'] ?? 1));
const n = (count: number) => Math.round(count * SCALE);

let testDb: TestDatabase;
let server: ServerProcess;
let cookie = '';
beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
  // The server in its own process, so its resident memory is measured alone and a crash shows as an exit.
  server = await startServerProcess(testDb.config.db.database, { BW_INGEST_FLUSH_MS: '20', BW_BROKER_CONNECT_TIMEOUT_MS: '1500' });
  const res = await fetch(`${server.url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: 'tech1@saltmarsh.example', password: 'brightward-demo' }),
  });
  cookie = String(res.headers.get('set-cookie')).split(';')[0]!;
});
afterAll(async () => {
  await server?.kill('SIGTERM');
  await testDb?.drop();
});

interface Metrics {
  ingest: { rejected: Record<string, number> };
  broker: BrokerCounters;
}
async function metrics(): Promise<Metrics> {
  const res = await fetch(`${server.url}/api/metrics`, { headers: { Cookie: cookie } });
  if (res.status !== 200) throw new Error(`GET /api/metrics answered ${res.status}`);
  return (await res.json()) as Metrics;
}
const port = () => server.brokerPort;
const unitId = async (serial: string) => Number((await testDb.db('units').where({ serial }).first('id')).id);
const rowsOf = async (serial: string) =>
  Number(
    (
      (await testDb
        .db('telemetry')
        .where({ unit_id: await unitId(serial) })
        .count({ n: '*' })) as [{ n: number }]
    )[0].n,
  );

/** Seeded pseudo-random numbers, so a failing run can be repeated. */
const rng = seededRandom;

/** Runs `task(i)` for i in [0, count) with at most `width` at once. */
async function pool(count: number, width: number, task: (i: number) => Promise<void>): Promise<void> {
  let next = 0;
  await Promise.all(
    Array.from({ length: Math.min(width, count) }, async () => {
      while (next < count) await task(next++);
    }),
  );
}

const connectBytes = (fields: Record<string, unknown>) =>
  mqttPacket.generate({
    cmd: 'connect',
    protocolId: 'MQTT',
    protocolVersion: 4,
    clean: true,
    clientId: 'X-0001',
    keepalive: 30,
    ...fields,
  } as mqttPacket.IConnectPacket);

/** Bad first packets of a connection, each with the broker counter it must land in. */
const RAW_CLASSES: {
  name: string;
  counter: 'protocolErrors' | 'tooLarge' | 'connectTimeouts' | `refused.${string}`;
  bytes: () => Buffer | null;
}[] = [
  { name: 'reserved packet type 0', counter: 'protocolErrors', bytes: () => Buffer.from([0x00, 0x00]) },
  { name: 'reserved packet type 15', counter: 'protocolErrors', bytes: () => Buffer.from([0xf0, 0x00]) },
  {
    name: 'SUBSCRIBE with wrong header flags',
    counter: 'protocolErrors',
    bytes: () => Buffer.from([0x80, 0x06, 0x00, 0x01, 0x00, 0x01, 0x61, 0x00]),
  },
  {
    name: 'PUBLISH with both QoS bits set',
    counter: 'protocolErrors',
    bytes: () => Buffer.from([0x36, 0x05, 0x00, 0x01, 0x61, 0x00, 0x01]),
  },
  {
    name: 'CONNECT with a wrong protocol name',
    counter: 'protocolErrors',
    bytes: () => {
      const b = connectBytes({});
      b.write('MQTX', 4);
      return b;
    },
  },
  {
    name: 'CONNECT cut short inside its announced length',
    counter: 'protocolErrors',
    bytes: () => {
      const b = connectBytes({ username: 'X-0001', password: Buffer.from('p') });
      b[1] = 12;
      return b.subarray(0, 14);
    },
  },
  { name: 'PUBLISH before CONNECT', counter: 'protocolErrors', bytes: () => mqttPacket.generate(qos1('bw/v1/units/X/telemetry', '{}', 1)) },
  { name: 'PINGREQ before CONNECT', counter: 'protocolErrors', bytes: () => Buffer.from([0xc0, 0x00]) },
  {
    name: 'CONNECT announcing 200 MB',
    counter: 'tooLarge',
    bytes: () => Buffer.concat([Buffer.from([0x10, 0x80, 0x80, 0x80, 0x64]), Buffer.alloc(512, 0x41)]),
  },
  {
    name: 'CONNECT of 4 KB (a huge will)',
    counter: 'tooLarge',
    bytes: () => connectBytes({ will: { topic: 'bw/v1/units/X-0001/status', payload: Buffer.alloc(4000, 0x41), qos: 1, retain: true } }),
  },
  { name: 'MQTT 5 CONNECT', counter: 'refused.protocol_version', bytes: () => connectBytes({ protocolVersion: 5, properties: {} }) },
  {
    name: 'wrong secret',
    counter: 'refused.bad_credentials',
    bytes: () => connectBytes({ clientId: 'QHL-2402', username: 'QHL-2402', password: Buffer.from('not-the-secret') }),
  },
  {
    name: 'unknown serial',
    counter: 'refused.bad_credentials',
    bytes: () => connectBytes({ clientId: 'ZZZ-0001', username: 'ZZZ-0001', password: Buffer.from('x') }),
  },
  {
    name: "own credentials, another unit's client id",
    counter: 'refused.identifier_rejected',
    bytes: () => connectBytes({ clientId: 'FSC-2401', username: 'QHL-2402', password: Buffer.from(testDeviceSecret('QHL-2402')) }),
  },
  {
    name: "own credentials, will on another unit's status",
    counter: 'refused.will_denied',
    bytes: () =>
      connectBytes({
        clientId: 'QHL-2402',
        username: 'QHL-2402',
        password: Buffer.from(testDeviceSecret('QHL-2402')),
        will: { topic: unitTopic('FSC-2401', 'status'), payload: Buffer.from('{"v":1,"online":false}'), qos: 1, retain: true },
      }),
  },
  { name: 'nothing at all', counter: 'connectTimeouts', bytes: () => null },
];

const counterOf = (c: BrokerCounters, key: string): number =>
  key.startsWith('refused.') ? c.refused[key.slice(8) as keyof BrokerCounters['refused']] : (c[key as keyof BrokerCounters] as number);
const brokerTotal = (c: BrokerCounters) =>
  c.protocolErrors + c.tooLarge + c.connectTimeouts + c.pendingLimit + Object.values(c.refused).reduce((a, b) => a + b, 0);

/** Sends bytes on a fresh socket and waits for the broker to hang up. */
async function hitAndWait(bytes: Buffer | null): Promise<void> {
  const c = await rawSocket(port());
  if (bytes) c.send(bytes);
  await c.closed;
}

/** A unit's bad payloads on one connection: each is answered with a PUBACK (dropped and counted), the link stays up. */
function badPayloads(
  count: number,
  seed: number,
): { payloads: Buffer[]; leaves: ('telemetry' | 'weather')[]; reasons: Record<string, number> } {
  const r = rng(seed);
  const now = Date.now();
  const reasons: Record<string, number> = {};
  const payloads: Buffer[] = [];
  const kinds: [string, (i: number) => string | Buffer][] = [
    ['malformed_json', (i) => `{"v":1,"seq":${i},`],
    ['malformed_json', () => Buffer.from([0xff, 0xfe, 0x00, 0x7b])],
    ['invalid_payload', (i) => JSON.stringify({ ...sample(i, now - 60_000), poaWm2: 'bright' })],
    ['invalid_payload', (i) => JSON.stringify({ ...sample(i, now - 60_000), extra: true })],
    ['invalid_payload', (i) => JSON.stringify({ ...sample(i, now - 60_000), v: 2 })],
    ['invalid_payload', () => '[]'],
    ['invalid_payload', () => 'null'],
    ['oversized', () => Buffer.alloc(8193 + Math.floor(r() * 800), 0x20)],
    ['future_timestamp', (i) => JSON.stringify(sample(i, now + 3600_000))],
    ['too_old', (i) => JSON.stringify(sample(i, now - 500 * 86_400_000))],
  ];
  const weather = (i: number) =>
    JSON.stringify({ v: 1, ts: new Date(now - 60_000 - i).toISOString(), ghiWm2: 300, airTempC: 9, windMs: 30, gustMs: 45 });
  const leaves: ('telemetry' | 'weather')[] = [];
  for (let i = 0; i < count; i++) {
    // One in eleven is a fake gale from a unit that does not carry its site's weather station.
    const [reason, make, leaf] =
      r() < 1 / 11 ? ['weather_denied', weather, 'weather' as const] : [...kinds[Math.floor(r() * kinds.length)]!, 'telemetry' as const];
    reasons[reason] = (reasons[reason] ?? 0) + 1;
    payloads.push(Buffer.from(make(i)));
    leaves.push(leaf);
  }
  return { payloads, leaves, reasons };
}

/** Publishes that break a topic rule: the broker hangs up and counts the reason. Sequential per serial (one connection at a time). */
const ACL_CASES: { reason: string; serial: string; packet: (serial: string, id: number) => mqttPacket.Packet }[] = [
  {
    reason: 'retain_denied',
    serial: 'QHL-2402',
    packet: (s, id) => qos1(unitTopic(s, 'telemetry'), JSON.stringify(sample(id, Date.now() - 1000)), id, true),
  },
  { reason: 'retain_denied', serial: 'QHL-2403', packet: (s, id) => qos1(unitTopic(s, 'events'), '{"v":1}', id, true) },
  { reason: 'acl_denied', serial: 'QHL-2404', packet: (_s, id) => qos1(unitTopic('FSC-2401', 'telemetry'), '{}', id) },
  { reason: 'acl_denied', serial: 'QHL-2405', packet: (s, id) => qos1(unitTopic(s, 'commands'), '{}', id) },
  { reason: 'acl_denied', serial: 'QHL-2406', packet: (_s, id) => qos1(`$SYS/${id}/new/clients`, 'x', id) },
  { reason: 'packet_too_large', serial: 'QED-2406', packet: (s, id) => qos1(unitTopic(s, 'events'), Buffer.alloc(64 * 1024, 0x20), id) },
];

describe('MQTT fuzz', () => {
  it(
    'survives malformed, oversized, wrong-topic and wrong-schema packets and a connect storm: memory bounded, every bad message counted by reason, every good reading stored',
    async () => {
      const rssMb = () => server.rssMb();
      let idleMb = 0;
      let peakMb = 0;
      let sampler: NodeJS.Timeout | undefined;
      onTestFinished(() => clearInterval(sampler));
      const m0 = await metrics();
      const b0 = m0.broker;
      const r0 = m0.ingest.rejected;
      const expectBroker: Record<string, number> = {};
      const expectIngest: Record<string, number> = {};
      const add = (m: Record<string, number>, k: string, v = 1) => {
        m[k] = (m[k] ?? 0) + v;
      };
      let bad = 0;

      // Good traffic all along: six units reporting with unique timestamps.
      const goodUnits = ['FSC-2402', 'FSC-2403', 'FSC-2404', 'FSC-2405', 'FSC-2406', 'FGA-2401'];
      let stopGood = false;
      onTestFinished(() => {
        stopGood = true;
      });
      const goodSent = new Map<string, number>();
      const good = Promise.all(
        goodUnits.map(async (serial, u) => {
          const { c, connack } = await rawConnect(port(), serial, testDeviceSecret(serial));
          expect(connack.returnCode).toBe(0);
          c.keepPubacks = false;
          const t0 = Date.now() - 600_000 + u; // 100 readings a second, 10 ms apart: never ahead of the server clock
          let i = 0;
          while ((!stopGood || i < 50) && !c.isClosed()) {
            c.send(qos1(unitTopic(serial, 'telemetry'), JSON.stringify(sample(i, t0 + i * 10)), (i % 65535) + 1));
            i++;
            if (i % 10 === 0) await new Promise((res) => setTimeout(res, 100));
          }
          goodSent.set(serial, i);
          await waitFor(() => c.pubacks() === i, 30_000, `PUBACKs for ${serial}`);
          c.destroy();
        }),
      );

      // Idle: the server up, the good units connected and their first readings stored.
      await waitFor(async () => (await rowsOf(goodUnits[0]!)) > 0, 10_000, 'the first good readings');
      idleMb = peakMb = rssMb();
      sampler = setInterval(() => {
        peakMb = Math.max(peakMb, rssMb());
      }, 25);

      // 1. Raw sockets, hand-built and garbled first packets.
      const rawPer = n(60);
      const rawJobs = RAW_CLASSES.flatMap((k) => Array.from({ length: rawPer }, () => k));
      // The silent ones all at once (each waits out the connect timeout), the rest through a pool.
      const silent = rawJobs.filter((k) => k.bytes() === null);
      const loud = rawJobs.filter((k) => k.bytes() !== null);
      await Promise.all([
        ...silent.map(async (k) => {
          await hitAndWait(null);
          add(expectBroker, k.counter);
          bad++;
        }),
        pool(loud.length, 100, async (i) => {
          const k = loud[i]!;
          await hitAndWait(k.bytes());
          add(expectBroker, k.counter);
          bad++;
        }),
      ]);

      // 2. Authenticated units publishing bad payloads (wrong schema, not JSON, oversized, bad timestamps, weather they may not report).
      const payloadUnits = ['QED-2402', 'QED-2403', 'QED-2404', 'QED-2405', 'FGA-2406']; // none carries a weather station
      const perUnit = n(1700);
      await Promise.all(
        payloadUnits.map(async (serial, u) => {
          const { payloads, leaves, reasons } = badPayloads(perUnit, 1000 + u);
          for (const [k, v] of Object.entries(reasons)) add(expectIngest, k, v);
          const { c } = await rawConnect(port(), serial, testDeviceSecret(serial));
          c.keepPubacks = false;
          for (let i = 0; i < payloads.length; i++) {
            c.send(qos1(unitTopic(serial, leaves[i]!), payloads[i]!, (i % 65535) + 1));
            if (i % 200 === 199) await waitFor(() => c.pubacks() >= i + 1 - 100, 10_000, 'PUBACKs to catch up');
          }
          await waitFor(() => c.pubacks() === payloads.length, 30_000, `PUBACKs for ${serial}'s bad payloads`);
          expect(c.isClosed()).toBe(false);
          bad += payloads.length;
          c.destroy();
        }),
      );

      // 3. Publishes that break a topic rule: one connection each, the broker hangs up.
      const aclPer = n(50);
      await Promise.all(
        ACL_CASES.map(async (k) => {
          for (let i = 1; i <= aclPer; i++) {
            const { c, connack } = await rawConnect(port(), k.serial, testDeviceSecret(k.serial));
            expect(connack.returnCode).toBe(0);
            c.send(k.packet(k.serial, i));
            await c.closed;
            add(expectIngest, k.reason);
            if (k.reason === 'packet_too_large') add(expectBroker, 'tooLarge');
            bad++;
          }
        }),
      );

      // 4. A storm of connects and disconnects: clean DISCONNECT, dropped links, and sessions taken over by a reconnect.
      const storm = ['QED-2401', 'FSC-2401', 'FGA-2402', 'FGA-2403', 'FGA-2404', 'FGA-2405'];
      const cycles = n(30);
      await Promise.all(
        storm.map(async (serial) => {
          for (let i = 0; i < cycles; i++) {
            const a = await rawConnect(port(), serial, testDeviceSecret(serial), {
              will: { topic: unitTopic(serial, 'status'), payload: Buffer.from('{"v":1,"online":false}'), qos: 1, retain: true },
            });
            expect(a.connack.returnCode).toBe(0);
            if (i % 3 === 0) a.c.send({ cmd: 'disconnect' });
            else if (i % 3 === 1) a.c.destroy();
            else {
              const b: RawClient = (await rawConnect(port(), serial, testDeviceSecret(serial))).c;
              await a.c.closed; // taken over
              b.destroy();
              await b.closed;
            }
            await a.c.closed;
          }
        }),
      );

      stopGood = true;
      await good;

      // Every bad message counted, by its reason.
      const m1 = await metrics();
      const b1 = m1.broker;
      for (const [k, v] of Object.entries(expectBroker)) expect([k, counterOf(b1, k) - counterOf(b0, k)]).toEqual([k, v]);
      const r1 = m1.ingest.rejected;
      for (const [k, v] of Object.entries(expectIngest)) expect([k, r1[k]! - r0[k]!]).toEqual([k, v]);

      // 5. Random bytes as first packets: each connection ends with exactly one counted reason, whatever it parsed as.
      const random = rng(42);
      const randomCount = n(240);
      const before = brokerTotal((await metrics()).broker);
      await pool(randomCount, 100, async () => {
        const len = 1 + Math.floor(random() * 48);
        const bytes = Buffer.from(Array.from({ length: len }, () => Math.floor(random() * 256)));
        await hitAndWait(bytes);
      });
      expect(brokerTotal((await metrics()).broker) - before).toBe(randomCount);
      bad += randomCount;
      expect(bad).toBeGreaterThanOrEqual(10_000 * SCALE);
      clearInterval(sampler);

      // Every good reading stored, once (each was acknowledged, so it is committed).
      for (const serial of goodUnits) expect([serial, await rowsOf(serial)]).toEqual([serial, goodSent.get(serial)]);
      expect(server.alive()).toBe(true);
      if (SCALE > 1 || process.env['BW_FUZZ_REPORT']) {
        console.log(
          JSON.stringify({
            badMessages: bad,
            broker: expectBroker,
            ingest: expectIngest,
            randomConnections: randomCount,
            goodReadings: [...goodSent.values()].reduce((a, b) => a + b, 0),
            idleRssMb: Math.round(idleMb),
            peakRssAboveIdleMb: Math.round(peakMb - idleMb),
          }),
        );
      }
      expect(peakMb - idleMb).toBeLessThanOrEqual(150);
      await waitFor(async () => (await metrics()).broker.pending === 0, 5000, 'no connection left unauthenticated');
    },
    180_000 * SCALE,
  );
});
