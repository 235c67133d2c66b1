import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { migrationSource } from '../../migrations/index';

let t: TestDatabase;
beforeAll(async () => { t = await createTestDatabase(); });
afterAll(async () => { await t?.drop(); });

const tables = async () =>
  ((await t.db.raw('SHOW TABLES'))[0] as Record<string, string>[]).map((r) => Object.values(r)[0]!).filter((n) => !n.startsWith('knex_')).sort();

describe('migrations', () => {
  it('every migration rolls back cleanly and applies again', async () => {
    const all = await tables();
    expect(all).toEqual(expect.arrayContaining(['owners', 'sites', 'units', 'users', 'telemetry', 'telemetry_1m', 'commands']));
    const names = await migrationSource.getMigrations([]);
    const [, rolledBack] = (await t.db.migrate.rollback(undefined, true)) as [number, string[]];
    expect(rolledBack.length).toBe(names.length);
    expect(await tables()).toEqual([]);
    await t.db.migrate.latest();
    expect(await tables()).toEqual(all);
  });
});
