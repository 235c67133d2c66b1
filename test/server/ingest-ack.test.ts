import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Telemetry } from '../../shared/contracts/wire';
import type { UnitInfo } from '../../server/services/unit-directory';
import { unitTopic } from '../../shared/contracts/topics';
import { testDeviceSecret } from '../helpers/device-secrets';
import { startTestStack } from '../helpers/test-stack';
import { startTcpProxy } from '../helpers/tcp-proxy';
import { connectUnit, sample, waitFor } from '../helpers/fake-unit';
import { rawConnect, qos1 } from '../helpers/raw-mqtt';

let proxy: Awaited<ReturnType<typeof startTcpProxy>>;
let stack: Awaited<ReturnType<typeof startTestStack>>;
/** Readings the health engine and other "stored" listeners heard, as `serial ts`. */
const heard: string[] = [];

beforeAll(async () => {
  proxy = await startTcpProxy(Number(process.env['BW_DB_PORT'] ?? 3308));
  stack = await startTestStack({
    seed: true,
    dbPort: proxy.port,
    stack: {
      ingest: { flushMs: 20, batchRows: 50, maxBufferRows: 100 },
      listeners: { stored: (u: UnitInfo, t: Telemetry) => void heard.push(`${u.serial} ${t.ts}`) },
    },
  });
});
afterAll(async () => {
  await proxy.restore().catch(() => undefined);
  await stack?.stop();
  await proxy?.close().catch(() => undefined);
});

const id = (serial: string) => stack.units.get(serial)!.id;
/** Counted through a direct connection: the stack's own goes through the proxy. */
const stored = async (serial: string, tsMs?: number) =>
  Number(
    (
      (await stack.testDb
        .db('telemetry')
        .where({ unit_id: id(serial), ...(tsMs === undefined ? {} : { ts: new Date(tsMs) }) })
        .count({ n: '*' })) as [{ n: number }]
    )[0].n,
  );

describe('QoS 1 acknowledgement after commit', () => {
  it('sends no PUBACK for a reading while the database cannot store it, and every PUBACK finds its row committed', async () => {
    const serial = 'QHL-2405';
    const u = await connectUnit(stack.broker.port, serial);
    const t0 = Date.now() - 300_000;
    await u.publishAsync(unitTopic(serial, 'telemetry'), JSON.stringify(sample(0, t0)), { qos: 1 });
    expect(await stored(serial, t0)).toBe(1);

    await proxy.cut();
    const failures = stack.ingest.counters.flushFailures;
    const rowAtAck: Promise<number>[] = [];
    for (let i = 1; i <= 20; i++) {
      const ts = t0 + i * 1000;
      u.publish(unitTopic(serial, 'telemetry'), JSON.stringify(sample(i, ts)), { qos: 1 }, (err) => {
        if (!err) rowAtAck.push(stored(serial, ts));
      });
    }
    await waitFor(() => stack.ingest.counters.flushFailures > failures + 1, 10_000, 'the ingest to fail to store the batch twice');
    expect(rowAtAck).toHaveLength(0);

    await proxy.restore();
    await waitFor(() => rowAtAck.length === 20, 20_000, '20 PUBACKs');
    expect(await Promise.all(rowAtAck)).toEqual(Array(20).fill(1));
    await u.endAsync();
  });

  it('stores and announces a reading once when the unit resends it after a PUBACK it never got', async () => {
    const serial = 'QHL-2406';
    const ts = Date.now() - 200_000;
    const body = JSON.stringify(sample(1, ts));
    const first = await rawConnect(stack.broker.port, serial, testDeviceSecret(serial));
    await proxy.cut();
    first.c.send(qos1(unitTopic(serial, 'telemetry'), body, 1));
    await waitFor(() => !stack.ingest.counters.databaseUp, 10_000, 'the ingest to notice the outage');
    // The link drops before the PUBACK: the unit keeps the reading and resends it on its next connection (which needs
    // the database back to check its credentials); the first copy may be stored before or after the resend arrives.
    first.c.destroy();
    await first.c.closed;
    expect(first.c.received.filter((p) => p.cmd === 'puback')).toEqual([]);
    await proxy.restore();
    const second = await rawConnect(stack.broker.port, serial, testDeviceSecret(serial));
    expect(second.connack.returnCode).toBe(0);
    second.c.send(qos1(unitTopic(serial, 'telemetry'), body, 1, false, true));
    expect((await second.c.next('puback')).messageId).toBe(1);
    expect(await stored(serial)).toBe(1);
    await stack.ingest.drain();
    expect(heard.filter((h) => h.startsWith(`${serial} `))).toEqual([`${serial} ${new Date(ts).toISOString()}`]);
    second.c.destroy();
  });

  it('keeps back-pressure during an outage: the buffer never passes its limit, and every reading is stored once it is back', async () => {
    const serial = 'QHL-2404';
    const t0 = Date.now() - 100_000;
    const { c } = await rawConnect(stack.broker.port, serial, testDeviceSecret(serial));
    await proxy.cut();
    let maxBuffered = 0;
    const watch = setInterval(() => {
      maxBuffered = Math.max(maxBuffered, stack.ingest.bufferedRows);
    }, 2);
    for (let i = 0; i < 400; i++) c.send(qos1(unitTopic(serial, 'telemetry'), JSON.stringify(sample(i, t0 + i * 100)), (i % 60000) + 1));
    await waitFor(() => stack.ingest.counters.held > 0, 10_000, 'deliveries to be held');
    expect(stack.ingest.bufferedRows).toBeLessThanOrEqual(100);
    await proxy.restore();
    await waitFor(() => c.received.filter((p) => p.cmd === 'puback').length === 400, 30_000, '400 PUBACKs');
    clearInterval(watch);
    expect(maxBuffered).toBeLessThanOrEqual(100);
    expect(await stored(serial)).toBe(400);
    c.destroy();
  });
});
