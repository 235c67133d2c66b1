import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestStack } from '../helpers/test-stack';
import { startTcpProxy } from '../helpers/tcp-proxy';
import { connectUnit, publish, sample, waitFor } from '../helpers/fake-unit';

let proxy: Awaited<ReturnType<typeof startTcpProxy>>;
let stack: Awaited<ReturnType<typeof startTestStack>>;

beforeAll(async () => {
  proxy = await startTcpProxy(Number(process.env['BW_DB_PORT'] ?? 3308));
  stack = await startTestStack({ seed: true, dbPort: proxy.port, stack: { ingest: { flushMs: 20, batchRows: 50 } } });
});
afterAll(async () => {
  await proxy.restore().catch(() => undefined);
  await stack?.stop();
  await proxy?.close().catch(() => undefined);
});

describe('database outage during ingestion', () => {
  it('buffers while MariaDB is unreachable and drains afterwards with exact counts and no duplicates', async () => {
    const serial = 'FSC-2401';
    const id = stack.units.get(serial)!.id;
    // Count through a direct connection (the stack's own goes through the proxy).
    const rows = async () =>
      Number(((await stack.testDb.db('telemetry').where({ unit_id: id }).count({ n: '*' })) as [{ n: number }])[0].n);
    const u = await connectUnit(stack.broker.port, serial);
    const t0 = Date.now() - 600_000;
    for (let i = 0; i < 100; i++) await publish(u, serial, 'telemetry', sample(i, t0 + i * 1000));
    await waitFor(async () => (await rows()) === 100, 5000, 'first 100 rows');

    await proxy.cut();
    // No PUBACK comes while the rows cannot be stored, so these are sent without waiting for one.
    const acked: Promise<void>[] = [];
    for (let i = 100; i < 400; i++) acked.push(publish(u, serial, 'telemetry', sample(i, t0 + i * 1000)));
    // Resends of already-stored samples during the outage must not duplicate either.
    for (let i = 50; i < 100; i++) acked.push(publish(u, serial, 'telemetry', sample(i, t0 + i * 1000)));
    await waitFor(() => !stack.ingest.counters.databaseUp, 5000, 'the ingest to notice the outage');
    expect(stack.ingest.bufferedRows).toBeGreaterThan(0);
    expect(await rows()).toBe(100);

    await proxy.restore();
    await Promise.all(acked);
    await waitFor(async () => stack.ingest.bufferedRows === 0 && (await rows()) === 400, 20_000, 'the buffer to drain');
    expect(stack.ingest.counters.databaseUp).toBe(true);
    expect(stack.ingest.counters.flushFailures).toBeGreaterThan(0);
    const seqs = (await stack.testDb.db('telemetry').where({ unit_id: id }).orderBy('ts').select('seq')).map((r) => Number(r.seq));
    expect(seqs).toEqual(Array.from({ length: 400 }, (_, i) => i));
    expect(stack.ingest.counters.duplicates).toBe(50);
    await u.endAsync();
  });
});
