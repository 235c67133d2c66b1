import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { unitTopic } from '../../shared/contracts/topics';
import { testDeviceSecret } from '../helpers/device-secrets';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { rawConnect, qos1, type RawClient } from '../helpers/raw-mqtt';
import { sample, waitFor } from '../helpers/fake-unit';

let testDb: TestDatabase;
const children = new Set<ServerProcess>();

beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
});
afterAll(async () => {
  for (const c of children) await c.kill('SIGKILL');
  await testDb?.drop();
});

const startServer = () => startServerProcess(testDb.config.db.database, { BW_INGEST_FLUSH_MS: '300', BW_INGEST_BATCH_ROWS: '1000' });

const pubacks = (c: RawClient) =>
  new Set(c.received.flatMap((p) => (p.cmd === 'puback' && p.messageId !== undefined ? [p.messageId] : [])));

describe('server process killed with SIGKILL', () => {
  it('loses no reading it acknowledged, and stores the unacknowledged ones once when the unit resends them after a restart', async () => {
    const serial = 'QED-2405';
    const unitId = Number((await testDb.db('units').where({ serial }).first('id')).id);
    const t0 = Date.now() - 600_000;
    const body = (i: number) => JSON.stringify(sample(i, t0 + i * 1000));
    const N = 300;

    const first = await startServer();
    children.add(first);
    const { c, connack } = await rawConnect(first.brokerPort, serial, testDeviceSecret(serial));
    expect(connack.returnCode).toBe(0);
    let sent = 0;
    const pace = setInterval(() => {
      for (let k = 0; k < 2 && sent < N; k++, sent++) c.send(qos1(unitTopic(serial, 'telemetry'), body(sent), sent + 1));
    }, 5);
    await waitFor(() => pubacks(c).size >= 100, 20_000, '100 PUBACKs');
    await first.kill('SIGKILL');
    clearInterval(pace);
    await c.closed;

    const acked = [...pubacks(c)].map((id) => id - 1);
    const storedSeqs = async () =>
      new Set((await testDb.db('telemetry').where({ unit_id: unitId }).select('seq')).map((r) => Number(r.seq)));
    const afterKill = await storedSeqs();
    expect(acked.filter((i) => !afterKill.has(i))).toEqual([]); // lost: acknowledged but not stored

    // The unit resends what it has no PUBACK for, on its next connection to the restarted server.
    const second = await startServer();
    children.add(second);
    const again = await rawConnect(second.brokerPort, serial, testDeviceSecret(serial));
    const ackedSet = new Set(acked);
    const resend = Array.from({ length: N }, (_, i) => i).filter((i) => !ackedSet.has(i));
    for (const i of resend) again.c.send(qos1(unitTopic(serial, 'telemetry'), body(i), i + 1, false, i < sent));
    await waitFor(() => pubacks(again.c).size === resend.length, 20_000, 'PUBACKs for every resent reading');
    const final = await storedSeqs();
    expect(final.size).toBe(N);
    expect(Number(((await testDb.db('telemetry').where({ unit_id: unitId }).count({ n: '*' })) as [{ n: number }])[0].n)).toBe(N);
    again.c.destroy();
    expect(await second.kill('SIGTERM')).toBe(0);
  }, 60_000);
});
