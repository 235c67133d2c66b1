import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { loadConfig } from '../config';
import { createDb, describeDbError, migrateLatest, type Db } from '../data/db';
import { demoSerials } from '../../shared/demo-world';
import { rekeyDemoUnits, seedDemoWorld } from '../../seeds/demo-world';
import { hashDeviceSecret, newDeviceSecret } from '../services/device-secret';

/**
 * `migrate.ts latest [--demo]` | `rollback` | `demo`: schema changes, and — only when asked — the invented demo world.
 * The demo has well-known passwords, so it is never the silent default of a server pointed at a new database: `npm start`
 * asks for it by name and says so. Demo device secrets are random and kept in a file only the simulator reads.
 */
const DEMO_SECRETS_FILE = process.env['BW_DEMO_SECRETS_FILE'] ?? '.data/demo/device-secrets.json';

async function seedDemo(db: Db, bcryptCost: number): Promise<void> {
  const { seeded, deviceSecrets } = await seedDemoWorld(db, { newDeviceSecret, hashDeviceSecret }, { bcryptCost });
  if (seeded) {
    writeSecrets(deviceSecrets);
    console.log(
      `[db] demo world seeded (invented data; demo passwords — never use this database for real units). Device secrets in ${DEMO_SECRETS_FILE}`,
    );
    return;
  }
  if (!secretsCoverDemo()) {
    writeSecrets(await rekeyDemoUnits(db, { newDeviceSecret, hashDeviceSecret }));
    console.log(`[db] data present: demo seed skipped; demo units given new device secrets (${DEMO_SECRETS_FILE})`);
  } else {
    console.log('[db] data present: demo seed skipped');
  }
}

function secretsCoverDemo(): boolean {
  if (!existsSync(DEMO_SECRETS_FILE)) return false;
  try {
    const s = JSON.parse(readFileSync(DEMO_SECRETS_FILE, 'utf8')) as Record<string, unknown>;
    return demoSerials().every((serial) => typeof s[serial] === 'string');
  } catch {
    return false;
  }
}

function writeSecrets(secrets: Record<string, string>): void {
  mkdirSync(dirname(DEMO_SECRETS_FILE), { recursive: true });
  writeFileSync(DEMO_SECRETS_FILE, JSON.stringify(secrets, null, 2) + '\n', { mode: 0o600 });
  chmodSync(DEMO_SECRETS_FILE, 0o600);
}

const cmd = process.argv[2];
const config = loadConfig();
const db = createDb(config.db);
try {
  if (cmd === 'latest') {
    const applied = await migrateLatest(db);
    console.log(applied.length ? `[db] applied ${applied.length} migration(s): ${applied.join(', ')}` : '[db] schema up to date');
    if (process.argv.includes('--demo')) await seedDemo(db, config.bcryptCost);
  } else if (cmd === 'rollback') {
    const [, names] = (await db.migrate.rollback()) as [number, string[]];
    console.log(`[db] rolled back: ${names.join(', ') || 'nothing'}`);
  } else if (cmd === 'demo') {
    await seedDemo(db, config.bcryptCost);
  } else {
    console.error('usage: migrate.ts latest [--demo] | rollback | demo');
    process.exitCode = 2;
  }
} catch (err) {
  console.error(`[db] ${describeDbError(err, config.db)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
