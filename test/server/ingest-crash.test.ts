import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { unitTopic } from '../../shared/contracts/topics';
import { demoDeviceSecret } from '../../seeds/demo-world';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { rawConnect, qos1, type RawClient } from '../helpers/raw-mqtt';
import { sample, waitFor } from '../helpers/fake-unit';

const main = fileURLToPath(new URL('../../server/main.ts', import.meta.url));
let testDb: TestDatabase;
const children = new Set<ChildProcess>();

beforeAll(async () => { testDb = await createTestDatabase({ seed: true }); });
afterAll(async () => {
  for (const c of children) c.kill('SIGKILL');
  await testDb?.drop();
});

/** The real server process (server/main.ts) on free ports; resolves with its broker port once it says it is ready. */
async function startServer(): Promise<{ proc: ChildProcess; brokerPort: number }> {
  const proc = spawn(process.execPath, ['--import', 'tsx', main], {
    env: {
      ...process.env, BW_DB_NAME: testDb.config.db.database, BW_PORT: '0', BW_BROKER_PORT: '0', BW_LOG_LEVEL: 'info',
      BW_INGEST_FLUSH_MS: '300', BW_INGEST_BATCH_ROWS: '1000',
    },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  children.add(proc);
  proc.once('exit', () => children.delete(proc));
  const brokerPort = await new Promise<number>((res, rej) => {
    proc.once('exit', (code) => rej(new Error(`server exited with ${code} before it was ready`)));
    createInterface({ input: proc.stdout! }).on('line', (line) => {
      try {
        const m = JSON.parse(line) as { msg?: string; brokerPort?: number };
        if (m.msg === 'Brightward server ready' && m.brokerPort) res(m.brokerPort);
      } catch {
        /* not a log line */
      }
    });
  });
  return { proc, brokerPort };
}

const pubacks = (c: RawClient) => new Set(c.received.flatMap((p) => (p.cmd === 'puback' && p.messageId !== undefined ? [p.messageId] : [])));

describe('server process killed with SIGKILL', () => {
  it('loses no reading it acknowledged, and stores the unacknowledged ones once when the unit resends them after a restart', async () => {
    const serial = 'QED-2405';
    const unitId = Number((await testDb.db('units').where({ serial }).first('id')).id);
    const t0 = Date.now() - 600_000;
    const body = (i: number) => JSON.stringify(sample(i, t0 + i * 1000));
    const N = 300;

    const first = await startServer();
    const { c, connack } = await rawConnect(first.brokerPort, serial, demoDeviceSecret(serial));
    expect(connack.returnCode).toBe(0);
    let sent = 0;
    const pace = setInterval(() => {
      for (let k = 0; k < 2 && sent < N; k++, sent++) c.send(qos1(unitTopic(serial, 'telemetry'), body(sent), sent + 1));
    }, 5);
    await waitFor(() => pubacks(c).size >= 100, 20_000, '100 PUBACKs');
    first.proc.kill('SIGKILL');
    await new Promise((r) => first.proc.once('exit', r));
    clearInterval(pace);
    await c.closed;

    const acked = [...pubacks(c)].map((id) => id - 1);
    const storedSeqs = async () => new Set((await testDb.db('telemetry').where({ unit_id: unitId }).select('seq')).map((r) => Number(r.seq)));
    const afterKill = await storedSeqs();
    expect(acked.filter((i) => !afterKill.has(i))).toEqual([]); // lost: acknowledged but not stored

    // The unit resends what it has no PUBACK for, on its next connection to the restarted server.
    const second = await startServer();
    const again = await rawConnect(second.brokerPort, serial, demoDeviceSecret(serial));
    const ackedSet = new Set(acked);
    const resend = Array.from({ length: N }, (_, i) => i).filter((i) => !ackedSet.has(i));
    for (const i of resend) again.c.send(qos1(unitTopic(serial, 'telemetry'), body(i), i + 1, false, i < sent));
    await waitFor(() => pubacks(again.c).size === resend.length, 20_000, 'PUBACKs for every resent reading');
    const final = await storedSeqs();
    expect(final.size).toBe(N);
    expect(Number(((await testDb.db('telemetry').where({ unit_id: unitId }).count({ n: '*' })) as [{ n: number }])[0].n)).toBe(N);
    again.c.destroy();
    second.proc.kill('SIGTERM');
    await new Promise((r) => second.proc.once('exit', r));
  }, 60_000);
});
