import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import { demoSerials } from '../../shared/demo-world';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { waitFor } from '../helpers/fake-unit';
import { Unit } from './scale-units';

/**
 * Two servers on a 3-node Galera cluster behind haproxy (started by server/scripts/scale-test.sh), 40 units reporting
 * through them. One database node, then one server, are killed with SIGKILL: every reading a unit got a PUBACK for is
 * stored exactly once, and the surviving server keeps serving and takes over the once-only jobs.
 */
const run = promisify(execFile);
const galeraDir = resolve(process.env['BW_GALERA_DIR'] ?? '.data/galera');
const UNITS = 40;
const EVERY_MS = 50;

let testDb: TestDatabase;
const servers: ServerProcess[] = [];

beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
});
afterAll(async () => {
  for (const s of servers) await s.kill('SIGKILL');
  await testDb?.drop();
});

describe('two servers on a Galera cluster behind haproxy', () => {
  it('store every acknowledged reading exactly once through a database node kill and a server kill', async () => {
    const env = { BW_CLUSTER: '1', BW_SESSION_SECRET: 'scale-test-secret-scale-test-secret-00', BW_INGEST_FLUSH_MS: '100' };
    const a = await startServerProcess(testDb.config.db.database, env);
    servers.push(a);
    await a.waitForLog('this server now runs the once-only jobs', 10_000);
    const b = await startServerProcess(testDb.config.db.database, env);
    servers.push(b);
    const t0 = Date.now() - 3_600_000;
    const units = demoSerials()
      .slice(0, UNITS)
      .map((s) => new Unit(s, t0));
    await Promise.all(units.map((u, i) => u.connect(i % 2 ? b.brokerPort : a.brokerPort)));
    const pace = setInterval(() => {
      for (const u of units) {
        u.poll();
        u.publish();
      }
    }, EVERY_MS);
    const ackedNow = () => units.reduce((n, u) => n + u.acked.size, 0);
    try {
      await waitFor(() => ackedNow() > 1000, 30_000, '1,000 readings acknowledged');

      // The database node every connection goes to dies: haproxy cuts its sessions, the servers reconnect to the next.
      const node1 = Number(readFileSync(join(galeraDir, 'n1.pid'), 'utf8'));
      const killedDbAt = Date.now();
      process.kill(node1, 'SIGKILL');
      const beforeDb = ackedNow();
      await waitFor(() => ackedNow() > beforeDb + 500, 60_000, 'readings acknowledged again after the database node died');
      const dbRecoveryS = (Date.now() - killedDbAt) / 1000;
      // It comes back and catches up from the others (incremental state transfer); connections stay where they are.
      await run('bash', ['server/scripts/galera.sh', 'start-node', '1'], { env: process.env });

      // A server dies: its units reconnect to the other and send again what had no PUBACK.
      await a.kill('SIGKILL');
      // (The jobs may have moved already: the database node's death ended every lock session.)
      await b.waitForLog('this server now runs the once-only jobs', 5000);
      await Promise.all(units.filter((_, i) => i % 2 === 0).map((u) => u.connect(b.brokerPort)));
      const beforeServer = ackedNow();
      await waitFor(() => ackedNow() > beforeServer + 500, 60_000, 'readings acknowledged after the server died');
      console.log(JSON.stringify({ dbRecoveryS, acked: ackedNow() }));
    } finally {
      clearInterval(pace);
    }
    // Everything still pending is acknowledged in the end (the unit keeps it until then).
    await waitFor(
      () => {
        for (const u of units) u.poll();
        return units.every((u) => u.pending.size === 0);
      },
      60_000,
      'every reading acknowledged',
    );

    const rows: { unit_id: number; seq: number }[] = await testDb.db('telemetry').select('unit_id', 'seq');
    const ids = new Map<number, string>(
      (
        await testDb
          .db('units')
          .whereIn(
            'serial',
            units.map((u) => u.serial),
          )
          .select('id', 'serial')
      ).map((r) => [r.id, r.serial]),
    );
    const stored = new Map<string, number[]>();
    for (const r of rows) {
      const serial = ids.get(r.unit_id);
      if (serial) stored.set(serial, [...(stored.get(serial) ?? []), Number(r.seq)]);
    }
    for (const u of units) {
      const seqs = stored.get(u.serial) ?? [];
      const lost = [...u.acked].filter((s) => !seqs.includes(s));
      const duplicated = seqs.length - new Set(seqs).size;
      expect({ serial: u.serial, lost: lost.length, duplicated }).toEqual({ serial: u.serial, lost: 0, duplicated: 0 });
      expect(new Set(seqs).size).toBe(u.seq);
    }
    const health = await fetch(`${b.url}/api/health`);
    expect(health.status).toBe(200);
    expect(b.alive()).toBe(true);
  });
});
