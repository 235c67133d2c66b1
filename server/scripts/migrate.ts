import { loadConfig } from '../config';
import { createDb, describeDbError, migrateLatest } from '../data/db';
import { seedDemoWorld } from '../../seeds/demo-world';

/** `migrate.ts latest [--seed]` | `rollback` | `seed`: schema changes and the demo world (seeded only into an empty database). */
const cmd = process.argv[2];
const config = loadConfig();
const db = createDb(config.db);
try {
  if (cmd === 'latest') {
    const applied = await migrateLatest(db);
    console.log(applied.length ? `[db] applied ${applied.length} migration(s): ${applied.join(', ')}` : '[db] schema up to date');
    if (process.argv.includes('--seed')) {
      const { seeded } = await seedDemoWorld(db, config.bcryptCost);
      console.log(seeded ? '[db] demo world seeded' : '[db] data present: demo seed skipped');
    }
  } else if (cmd === 'rollback') {
    const [, names] = (await db.migrate.rollback()) as [number, string[]];
    console.log(`[db] rolled back: ${names.join(', ') || 'nothing'}`);
  } else if (cmd === 'seed') {
    const { seeded } = await seedDemoWorld(db, config.bcryptCost);
    console.log(seeded ? '[db] demo world seeded' : '[db] data present: demo seed skipped');
  } else {
    console.error('usage: migrate.ts latest [--seed] | rollback | seed');
    process.exitCode = 2;
  }
} catch (err) {
  console.error(`[db] ${describeDbError(err, config.db)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
