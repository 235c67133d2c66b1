import knexFactory, { type Knex } from 'knex';
import type { Config } from '../config';
import { migrationSource } from '../../migrations/index';

export type Db = Knex;

/** A Knex instance on MariaDB. Times travel as UTC (`timezone: 'Z'`); DECIMAL arrives as numbers. */
export function createDb(db: Config['db']): Db {
  return knexFactory({
    client: 'mysql2',
    connection: {
      host: db.host,
      port: db.port,
      user: db.user,
      password: db.password,
      database: db.database,
      timezone: 'Z',
      supportBigNumbers: true,
      decimalNumbers: true,
      dateStrings: false,
    },
    // Session time zone UTC, so SQL date functions agree with the UTC values mysql2 writes.
    pool: {
      min: 0,
      max: db.poolMax,
      afterCreate: (
        conn: { query: (sql: string, cb: (err: Error | null) => void) => void },
        done: (err: Error | null, conn: unknown) => void,
      ) => conn.query("SET time_zone = '+00:00'", (err) => done(err, conn)),
    },
    migrations: { migrationSource, tableName: 'knex_migrations' },
  });
}

/** Resolves when the database answers a trivial query. */
export async function pingDatabase(db: Db): Promise<void> {
  await db.raw('SELECT 1');
}

export async function migrateLatest(db: Db): Promise<string[]> {
  const [, applied] = (await db.migrate.latest()) as [number, string[]];
  return applied;
}

/** Plain words for the most common start-up failure: the database is not there. */
export function describeDbError(err: unknown, cfg: Config['db']): string {
  const code = (err as { code?: string })?.code;
  const where = `MariaDB at ${cfg.host}:${cfg.port} (database ${cfg.database}, user ${cfg.user})`;
  if (code === 'ECONNREFUSED')
    return `Cannot reach ${where}: connection refused. Start it with "npm run db -- start" or set BW_DB_HOST/BW_DB_PORT.`;
  if (code === 'ER_ACCESS_DENIED_ERROR')
    return `${where} refused the credentials. Check BW_DB_USER/BW_DB_PASSWORD (or run "npm run db -- start" to create the account).`;
  if (code === 'ER_BAD_DB_ERROR') return `${where}: the database does not exist. Run "npm run db -- start" to create it.`;
  return `Cannot use ${where}: ${(err as Error)?.message ?? String(err)}`;
}
