import { pino } from 'pino';
import { loadConfig } from '../config';
import { createDb, describeDbError } from '../data/db';
import { UnitRepository } from '../data/unit-repository';
import { EngineAuth } from '../services/engine-auth';

/** Writes the message engine's users from the unit table (server/scripts/engine.sh runs it before the nodes start). */
const config = loadConfig();
if (!config.engine?.dir) {
  console.error('[engine] set BW_ENGINE_DIR and BW_ENGINE_PASSWORD');
  process.exit(2);
}
const db = createDb(config.db);
try {
  const auth = new EngineAuth(
    new UnitRepository(db),
    config.engine.dir,
    config.engine.service,
    pino({ level: 'silent' }),
    config.engine.partitions,
  );
  const { units, reloaded } = await auth.write();
  console.error(`[engine] users written: ${units} units${reloaded ? `, ${reloaded} running node(s) reloaded` : ''}`);
} catch (err) {
  console.error(`[engine] ${(err as { code?: string }).code ? describeDbError(err, config.db) : (err as Error).message}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
