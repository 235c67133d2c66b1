import { afterEach, describe, expect, it } from 'vitest';
import { startBroker, type RunningBroker } from '../../broker/broker';
import { unitPrefix, unitTopic } from '../../shared/contracts/topics';
import { statusSchema, telemetrySchema } from '../../shared/contracts/wire';
import { createFleet } from '../../simulator/fleet';
import { createPublisher } from '../../simulator/publisher';
import { createRng } from '../../simulator/rng';
import { demoSiteInfo } from '../../simulator/demo-fleet';

const QED = demoSiteInfo('QED');
const T0 = Date.parse('2026-04-20T09:00:00Z');
const secret = (s: string) => `secret-${s}`;

async function broker(port = 0): Promise<{ b: RunningBroker; got: { topic: string; body: unknown }[] }> {
  const got: { topic: string; body: unknown }[] = [];
  const b = await startBroker({
    host: '127.0.0.1',
    port,
    unitPrefix,
    authenticate: async (u, p) => (p === secret(u) ? { kind: 'unit', serial: u } : null),
  });
  b.aedes.subscribe(
    'bw/v1/units/#',
    (pkt, cb) => {
      got.push({ topic: pkt.topic, body: JSON.parse(pkt.payload.toString()) });
      cb();
    },
    () => {},
  );
  return { b, got };
}

let cleanup: (() => Promise<void>)[] = [];
afterEach(async () => {
  for (const c of cleanup.reverse()) await c();
  cleanup = [];
});

const until = async (f: () => boolean, ms = 8000) => {
  const t = performance.now();
  while (!f()) {
    if (performance.now() - t > ms) throw new Error('timed out');
    await new Promise((r) => setTimeout(r, 20));
  }
};

describe('publisher over real MQTT', () => {
  it('resends in order with original timestamps and seq after a broker outage', async () => {
    let { b, got } = await broker();
    const port = b.port;
    const fleet = createFleet(
      { sites: [{ site: QED, scenario: 'clear-day', units: [{ serial: 'SF-0001', siteCode: 'QED' }] }], startUnixMs: T0 },
      { rng: createRng(1) },
    );
    const pub = createPublisher(fleet, {
      url: `mqtt://127.0.0.1:${port}`,
      secretOf: secret,
      now: () => fleet.now(),
      reconnectPeriodMs: 200,
    });
    await pub.start(5000);
    pub.publish(fleet.step(10)); // seq 0, 1
    await until(() => got.filter((g) => g.topic.endsWith('/telemetry')).length === 2);
    expect(statusSchema.parse(got.find((g) => g.topic.endsWith('/status'))!.body).online).toBe(true);
    await b.close();
    await until(() => pub.connected() === 0);
    pub.publish(fleet.step(30)); // seq 2…7 produced during the outage: kept by the unit
    expect(fleet.unit('SF-0001')!.outbox.size).toBeGreaterThanOrEqual(6);
    ({ b, got } = await broker(port));
    cleanup.push(() => b.close());
    cleanup.push(() => pub.stop());
    await until(() => pub.connected() === 1);
    pub.publish(fleet.step(5)); // backlog first, then seq 8
    await until(() => got.filter((g) => g.topic.endsWith('/telemetry')).length >= 7);
    const tel = got.filter((g) => g.topic === unitTopic('SF-0001', 'telemetry')).map((g) => telemetrySchema.parse(g.body));
    expect(tel.map((t) => t.seq)).toEqual([2, 3, 4, 5, 6, 7, 8]);
    expect(tel.map((t) => t.ts)).toEqual([
      '2026-04-20T09:00:11Z',
      '2026-04-20T09:00:16Z',
      '2026-04-20T09:00:21Z',
      '2026-04-20T09:00:26Z',
      '2026-04-20T09:00:31Z',
      '2026-04-20T09:00:36Z',
      '2026-04-20T09:00:41Z',
    ]);
  });

  it('takes commands from its own topic and acknowledges them', async () => {
    const { b, got } = await broker();
    cleanup.push(() => b.close());
    const fleet = createFleet(
      { sites: [{ site: QED, scenario: 'clear-day', units: [{ serial: 'CM-0001', siteCode: 'QED' }] }], startUnixMs: T0 },
      { rng: createRng(1) },
    );
    const pub = createPublisher(fleet, {
      url: `mqtt://127.0.0.1:${b.port}`,
      secretOf: secret,
      now: () => fleet.now(),
      reconnectPeriodMs: 200,
    });
    await pub.start(5000);
    cleanup.push(() => pub.stop());
    await new Promise((r) => setTimeout(r, 100)); // subscription in place
    b.aedes.publish(
      {
        cmd: 'publish',
        topic: unitTopic('CM-0001', 'commands'),
        payload: Buffer.from(JSON.stringify({ v: 1, commandId: 'k1', ts: '2026-04-20T09:00:00Z', kind: 'hold' })),
        qos: 1,
        retain: false,
        dup: false,
      },
      () => {},
    );
    b.aedes.publish(
      {
        cmd: 'publish',
        topic: unitTopic('CM-0001', 'commands'),
        payload: Buffer.from(JSON.stringify({ v: 1, commandId: 'k2', kind: 'jump' })),
        qos: 1,
        retain: false,
        dup: false,
      },
      () => {},
    );
    await until(() => fleet.unit('CM-0001')!.held);
    await new Promise((r) => setTimeout(r, 100));
    pub.publish(fleet.step(1));
    await until(() => got.filter((g) => g.topic.endsWith('/acks')).length === 3);
    const acks = got.filter((g) => g.topic.endsWith('/acks')).map((g) => g.body as { commandId: string; result: string });
    expect(acks.map((a) => `${a.commandId}:${a.result}`)).toEqual(['k1:accepted', 'k1:done', 'k2:rejected']);
  });
});
