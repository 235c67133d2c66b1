import { RateLimiterMySQL, type RateLimiterAbstract } from 'rate-limiter-flexible';
import type { Db } from './db';

/**
 * Sign-in attempt counts kept in MariaDB (table `sign_in_attempts`), so every server counts against the same
 * limit. rate-limiter-flexible's MySQL store, on the server's own connection pool; expired keys are deleted now and
 * then by each server (harmless when several do it).
 */
export function sharedAttemptCounter(db: Db, database: string, limitPerMinute: number): RateLimiterAbstract {
  return new RateLimiterMySQL({
    storeClient: db,
    storeType: 'knex',
    dbName: database,
    tableName: 'sign_in_attempts',
    tableCreated: true,
    points: limitPerMinute,
    duration: 60,
  });
}
