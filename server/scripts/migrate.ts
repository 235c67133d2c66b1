import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { loadConfig } from '../config';
import { createDb, describeDbError, migrateLatest, type Db } from '../data/db';
import { demoSerials } from '../../shared/demo-world';
import { DEMO_OWNERS, rekeyDemoUnits, seedDemoWorld } from '../../seeds/demo-world';
import { engineSecretHash, hashDeviceSecret, newDeviceSecret } from '../services/device-secret';

/**
 * `migrate.ts latest [--demo]` | `rollback` | `demo` | `reset`: schema changes, and — only when asked — the invented demo
 * world. `reset` (npm run demo:reset) drops every table and builds the demo from scratch, with new device secrets; it
 * refuses a database that holds an owner of its own (not the demo's).
 * The demo has well-known passwords, so it is never the silent default of a server pointed at a new database: `npm start`
 * asks for it by name and says so. Demo device secrets are random and kept in a file only the simulator reads.
 */
const DEMO_SECRETS_FILE = process.env['BW_DEMO_SECRETS_FILE'] ?? '.data/demo/device-secrets.json';

async function seedDemo(db: Db, bcryptCost: number): Promise<void> {
  const { seeded, deviceSecrets } = await seedDemoWorld(db, { newDeviceSecret, hashDeviceSecret, engineSecretHash }, { bcryptCost });
  if (seeded) {
    writeSecrets(deviceSecrets);
    console.log(
      `[db] demo world seeded (invented data; demo passwords — never use this database for real units). Device secrets in ${DEMO_SECRETS_FILE}`,
    );
    return;
  }
  if (!secretsCoverDemo()) {
    writeSecrets(await rekeyDemoUnits(db, { newDeviceSecret, hashDeviceSecret, engineSecretHash }));
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

/** Rolls every migration back and applies them again: an empty schema, then the demo world. */
async function resetDemo(db: Db, bcryptCost: number): Promise<void> {
  const hasOwners = await db.schema.hasTable('owners');
  const owners: string[] = hasOwners ? await db('owners').pluck('name') : [];
  const demo = new Set(DEMO_OWNERS.map((o) => o.name));
  const foreign = owners.filter((o) => !demo.has(o));
  if (foreign.length) throw new Error(`demo reset refused: the database holds owners that are not the demo's (${foreign.join(', ')})`);
  await db.migrate.rollback(undefined, true);
  const applied = await migrateLatest(db);
  console.log(`[db] demo data dropped; schema rebuilt (${applied.length} migrations)`);
  await seedDemo(db, bcryptCost);
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
  } else if (cmd === 'reset') {
    await resetDemo(db, config.bcryptCost);
  } else {
    console.error('usage: migrate.ts latest [--demo] | rollback | demo | reset');
    process.exitCode = 2;
  }
} catch (err) {
  console.error(`[db] ${describeDbError(err, config.db)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
