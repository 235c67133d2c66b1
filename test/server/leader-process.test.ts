import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let testDb: TestDatabase;
const children = new Set<ServerProcess>();

beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
});
afterAll(async () => {
  for (const c of children) await c.kill('SIGKILL');
  await testDb?.drop();
});

const LEADS = 'this server now runs the once-only jobs';
const startServer = async () => {
  const s = await startServerProcess(testDb.config.db.database, {
    BW_CLUSTER: '1',
    BW_SESSION_SECRET: 'cluster-test-secret-cluster-test-secret',
  });
  children.add(s);
  return s;
};

describe('two server processes on one database', () => {
  it('run the once-only jobs in exactly one of them; killed with SIGKILL, the other takes them over within a second', async () => {
    const first = await startServer();
    await first.waitForLog(LEADS, 5000);
    const second = await startServer();
    // The second waits for the lock: it never says it leads while the first lives.
    await expect(second.waitForLog(LEADS, 1500)).rejects.toThrow(/no "this server now runs/);
    const jobs = (await first.waitForLog(LEADS, 0))['jobs'];
    expect(jobs).toEqual(['retention', 'comms watch', 'ticket timers', 'notifications and digests', 'statement lock', 'queued mail']);
    const t0 = Date.now();
    await first.kill('SIGKILL');
    await second.waitForLog(LEADS, 5000);
    // The database frees a dead server's lock as its connection closes, and the waiting server holds a GET_LOCK open.
    expect(Date.now() - t0).toBeLessThan(1000);
    expect(second.alive()).toBe(true);
  });
});
