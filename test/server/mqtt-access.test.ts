/**
 * MQTT access matrix: every topic rule of the broker, for a unit against its own prefix, another unit's prefix, wildcards,
 * `$SYS`, retained messages, wills, weather (only the site's station) and commands (read only, own only).
 * The expected outcomes are written out by hand here, never derived from the broker's own rules.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { unitTopic } from '../../shared/contracts/topics';
import { testDeviceSecret } from '../helpers/device-secrets';
import { startTestStack } from '../helpers/test-stack';
import { rawConnect, qos1 } from '../helpers/raw-mqtt';
import { sample, waitFor } from '../helpers/fake-unit';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { ingest: { flushMs: 20 } } });
});
afterAll(async () => {
  await stack?.stop();
});

/** QHL-2402 is an ordinary unit; QHL-2401 carries the weather station of Harbourside Library Roof. */
const A = 'QHL-2402';
const B = 'QHL-2403';
const STATION = 'QHL-2401';
const reading = () => JSON.stringify(sample(1, Date.now() - 60_000));
const weather = () =>
  JSON.stringify({ v: 1, ts: new Date(Date.now() - 60_000).toISOString(), ghiWm2: 400, airTempC: 11, windMs: 3, gustMs: 30 });
const status = JSON.stringify({ v: 1, online: true, firmware: '2.4.1' });

/** acknowledged: PUBACK and taken; dropped: PUBACK, not taken, counted, the link stays; refused: the broker hangs up, counted. */
type Outcome = 'acknowledged' | 'dropped' | 'refused';
const publishes: {
  rule: string;
  as: string;
  topic: string;
  payload: () => string;
  retain?: boolean;
  qos?: 0 | 1 | 2;
  expect: Outcome;
  reason?: string;
}[] = [
  { rule: 'own telemetry', as: A, topic: unitTopic(A, 'telemetry'), payload: reading, expect: 'acknowledged' },
  {
    rule: 'own events',
    as: A,
    topic: unitTopic(A, 'events'),
    payload: () => JSON.stringify({ v: 1, ts: new Date().toISOString(), kind: 'boot' }),
    expect: 'acknowledged',
  },
  {
    rule: 'own acks',
    as: A,
    topic: unitTopic(A, 'acks'),
    payload: () => JSON.stringify({ v: 1, commandId: 'none', ts: new Date().toISOString(), result: 'done' }),
    expect: 'acknowledged',
  },
  { rule: 'own status', as: A, topic: unitTopic(A, 'status'), payload: () => status, expect: 'acknowledged' },
  { rule: 'own status, retained', as: A, topic: unitTopic(A, 'status'), payload: () => status, retain: true, expect: 'acknowledged' },
  {
    rule: 'own telemetry, retained',
    as: A,
    topic: unitTopic(A, 'telemetry'),
    payload: reading,
    retain: true,
    expect: 'refused',
    reason: 'retain_denied',
  },
  {
    rule: 'own events, retained',
    as: A,
    topic: unitTopic(A, 'events'),
    payload: () => '{}',
    retain: true,
    expect: 'refused',
    reason: 'retain_denied',
  },
  {
    rule: 'own weather from a unit that is not the station',
    as: A,
    topic: unitTopic(A, 'weather'),
    payload: weather,
    expect: 'dropped',
    reason: 'weather_denied',
  },
  {
    rule: "own weather from the site's station",
    as: STATION,
    topic: unitTopic(STATION, 'weather'),
    payload: weather,
    expect: 'acknowledged',
  },
  {
    rule: 'own commands (server → unit only)',
    as: A,
    topic: unitTopic(A, 'commands'),
    payload: () => '{}',
    expect: 'refused',
    reason: 'acl_denied',
  },
  {
    rule: 'own prefix, unknown leaf',
    as: A,
    topic: `bw/v1/units/${A}/firmware`,
    payload: () => '{}',
    expect: 'refused',
    reason: 'acl_denied',
  },
  {
    rule: 'own prefix, one level deeper',
    as: A,
    topic: `bw/v1/units/${A}/telemetry/x`,
    payload: reading,
    expect: 'refused',
    reason: 'acl_denied',
  },
  { rule: 'own prefix itself', as: A, topic: `bw/v1/units/${A}/`, payload: reading, expect: 'refused', reason: 'acl_denied' },
  {
    rule: 'own telemetry at QoS 2',
    as: A,
    topic: unitTopic(A, 'telemetry'),
    payload: reading,
    qos: 2,
    expect: 'refused',
    reason: 'acl_denied',
  },
  { rule: 'foreign telemetry', as: A, topic: unitTopic(B, 'telemetry'), payload: reading, expect: 'refused', reason: 'acl_denied' },
  {
    rule: 'foreign status, retained',
    as: A,
    topic: unitTopic(B, 'status'),
    payload: () => '{"v":1,"online":false}',
    retain: true,
    expect: 'refused',
    reason: 'acl_denied',
  },
  {
    rule: 'foreign weather, from a station',
    as: STATION,
    topic: unitTopic(A, 'weather'),
    payload: weather,
    expect: 'refused',
    reason: 'acl_denied',
  },
  { rule: 'foreign commands', as: A, topic: unitTopic(B, 'commands'), payload: () => '{}', expect: 'refused', reason: 'acl_denied' },
  { rule: '$SYS', as: A, topic: '$SYS/broker/new/clients', payload: () => A, expect: 'refused', reason: 'acl_denied' },
  { rule: 'outside bw/v1/units', as: A, topic: 'bw/v1/fleet', payload: () => '{}', expect: 'refused', reason: 'acl_denied' },
];

describe('publish rules', () => {
  it.each(publishes)('$as publishing $rule: $expect', async (row) => {
    const { c, connack } = await rawConnect(stack.broker.port, row.as, testDeviceSecret(row.as));
    expect(connack.returnCode).toBe(0);
    const before = { ...stack.ingest.counters.rejected };
    const qos = row.qos ?? 1;
    c.send({ cmd: 'publish', topic: row.topic, payload: row.payload(), qos, messageId: 9, retain: row.retain ?? false, dup: false });
    if (row.expect === 'acknowledged' || row.expect === 'dropped') {
      expect((await c.next('puback')).messageId).toBe(9);
      expect(c.isClosed()).toBe(false);
      c.destroy();
      if (row.reason)
        expect(
          (stack.ingest.counters.rejected as Record<string, number>)[row.reason]! - (before as Record<string, number>)[row.reason]!,
        ).toBe(1);
    } else {
      await c.closed; // MQTT 3.1.1 has no per-message refusal: the broker hangs up
      expect(c.received.filter((p) => p.cmd === 'puback' || p.cmd === 'pubrec')).toEqual([]);
      const r = stack.ingest.counters.rejected as Record<string, number>;
      expect(r[row.reason!]! - (before as Record<string, number>)[row.reason!]!).toBe(1);
    }
  });

  it("stores the station's weather against its site, and nothing from refused publishes", async () => {
    const siteId = stack.units.get(STATION)!.siteId;
    await waitFor(
      async () => Number(((await stack.db('weather').where({ site_id: siteId }).count({ n: '*' })) as [{ n: number }])[0].n) === 1,
      5000,
      'the station reading',
    );
    const telemetryOfB = await stack.db('telemetry').where({ unit_id: stack.units.get(B)!.id });
    expect(telemetryOfB).toEqual([]);
  });
});

const subscribes: { rule: string; topic: string; granted: boolean }[] = [
  { rule: 'own commands', topic: unitTopic(A, 'commands'), granted: true },
  { rule: 'own telemetry', topic: unitTopic(A, 'telemetry'), granted: false },
  { rule: 'own status', topic: unitTopic(A, 'status'), granted: false },
  { rule: 'own weather', topic: unitTopic(A, 'weather'), granted: false },
  { rule: 'own prefix with #', topic: `bw/v1/units/${A}/#`, granted: false },
  { rule: 'own prefix with +', topic: `bw/v1/units/${A}/+`, granted: false },
  { rule: 'foreign commands', topic: unitTopic(B, 'commands'), granted: false },
  { rule: "every unit's commands (+)", topic: 'bw/v1/units/+/commands', granted: false },
  { rule: 'everything (#)', topic: '#', granted: false },
  { rule: 'every first level (+/#)', topic: '+/#', granted: false },
  { rule: '$SYS/#', topic: '$SYS/#', granted: false },
  { rule: '$SYS new clients', topic: '$SYS/+/new/clients', granted: false },
];

describe('subscribe rules', () => {
  it.each(subscribes)('a unit subscribing to $rule: granted $granted', async ({ topic, granted }) => {
    const { c } = await rawConnect(stack.broker.port, A, testDeviceSecret(A));
    c.send({ cmd: 'subscribe', messageId: 3, subscriptions: [{ topic, qos: 1 }] });
    const suback = await c.next('suback');
    expect(suback.granted).toEqual([granted ? 1 : 128]);
    expect(c.isClosed()).toBe(false);
    c.destroy();
  });

  it('delivers a unit its own commands only', async () => {
    const a = await rawConnect(stack.broker.port, A, testDeviceSecret(A));
    a.c.send({ cmd: 'subscribe', messageId: 1, subscriptions: [{ topic: unitTopic(A, 'commands'), qos: 1 }] });
    await a.c.next('suback');
    const publish = (serial: string, id: string) =>
      new Promise<void>((res, rej) =>
        stack.broker.aedes.publish(
          {
            cmd: 'publish',
            topic: unitTopic(serial, 'commands'),
            payload: Buffer.from(JSON.stringify({ commandId: id })),
            qos: 1,
            retain: false,
            dup: false,
          },
          (e) => (e ? rej(e) : res()),
        ),
      );
    await publish(B, 'for-b');
    await publish(A, 'for-a');
    const got = await a.c.next('publish');
    expect([got.topic, JSON.parse(String(got.payload)).commandId]).toEqual([unitTopic(A, 'commands'), 'for-a']);
    expect(a.c.received.filter((p) => p.cmd === 'publish')).toHaveLength(1);
    a.c.destroy();
  });
});

const wills: { rule: string; topic: string; retain: boolean; accepted: boolean }[] = [
  { rule: 'own status, retained', topic: unitTopic(A, 'status'), retain: true, accepted: true },
  { rule: 'own status, not retained', topic: unitTopic(A, 'status'), retain: false, accepted: true },
  { rule: 'own telemetry', topic: unitTopic(A, 'telemetry'), retain: false, accepted: false },
  { rule: 'foreign status', topic: unitTopic(B, 'status'), retain: true, accepted: false },
  { rule: '$SYS', topic: '$SYS/x', retain: false, accepted: false },
];

describe('will rules', () => {
  it.each(wills)('a CONNECT with a will on $rule: accepted $accepted', async ({ topic, retain, accepted }) => {
    const { c, connack } = await rawConnect(stack.broker.port, A, testDeviceSecret(A), {
      will: { topic, payload: Buffer.from('{"v":1,"online":false}'), qos: 1, retain },
    });
    expect(connack.returnCode).toBe(accepted ? 0 : 5); // 5: not authorized
    c.destroy();
  });

  it('publishes the own-status will when the link drops, and the unit shows offline', async () => {
    const { c } = await rawConnect(stack.broker.port, A, testDeviceSecret(A), {
      will: { topic: unitTopic(A, 'status'), payload: Buffer.from('{"v":1,"online":false}'), qos: 1, retain: true },
    });
    c.send(qos1(unitTopic(A, 'status'), status, 2));
    await c.next('puback');
    await waitFor(() => stack.live.get(stack.units.get(A)!.id)?.online === true, 3000, 'online');
    c.destroy();
    await waitFor(() => stack.live.get(stack.units.get(A)!.id)?.online === false, 3000, 'offline from the will');
  });
});
