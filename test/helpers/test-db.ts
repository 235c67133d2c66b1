import { randomBytes } from 'node:crypto';
import { rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import knexFactory from 'knex';
import { loadConfig, type Config } from '../../server/config';
import { createDb, migrateLatest, type Db } from '../../server/data/db';
import { seedDemoWorld } from '../../seeds/demo-world';
import { hashDeviceSecret, newDeviceSecret } from '../../server/services/device-secret';
import { testDeviceSecret } from './device-secrets';

export interface TestDatabase {
  config: Config;
  db: Db;
  drop(): Promise<void>;
}

/**
 * A fresh, migrated database on the test MariaDB (BW_DB_* set by `npm test`; its account may create databases).
 * Each test file gets its own, so files never share rows and can run in any order.
 */
export async function createTestDatabase(opts: { seed?: boolean; env?: Record<string, string> } = {}): Promise<TestDatabase> {
  const base = loadConfig({ BW_BCRYPT_COST: '4', BW_LOG_LEVEL: 'silent', ...process.env, ...opts.env });
  const name = `bwt_${process.pid}_${randomBytes(3).toString('hex')}`;
  const admin = knexFactory({
    client: 'mysql2',
    connection: { host: base.db.host, port: base.db.port, user: base.db.user, password: base.db.password },
  });
  try {
    await admin.raw(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  } finally {
    await admin.destroy();
  }
  // Ticket files go to a local store of this database's own (the default .data/s3 is the demo's).
  const filesDir = join(tmpdir(), `${name}-s3`);
  const config: Config = {
    ...base,
    db: { ...base.db, database: name },
    files: base.files.kind === 'local' ? { kind: 'local', directory: filesDir } : base.files,
  };
  const db = createDb(config.db);
  await migrateLatest(db);
  if (opts.seed) await seedDemoWorld(db, { newDeviceSecret, hashDeviceSecret }, { bcryptCost: 4, deviceSecretOf: testDeviceSecret });
  return {
    config,
    db,
    drop: async () => {
      await db.raw(`DROP DATABASE IF EXISTS \`${name}\``);
      await db.destroy();
      rmSync(filesDir, { recursive: true, force: true });
    },
  };
}
