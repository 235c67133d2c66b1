import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { migrationSource } from '../../migrations/index';

let t: TestDatabase;
beforeAll(async () => {
  t = await createTestDatabase();
});
afterAll(async () => {
  await t?.drop();
});

const tables = async () =>
  ((await t.db.raw('SHOW TABLES'))[0] as Record<string, string>[])
    .map((r) => Object.values(r)[0]!)
    .filter((n) => !n.startsWith('knex_'))
    .sort();

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

describe('holds migration', () => {
  it('keeps a unit flagged on hold held: a hold held by whoever sent its latest hold command, else by the first admin', async () => {
    const s = await createTestDatabase({ seed: true });
    try {
      while (String(await s.db.migrate.currentVersion()) >= '20261203100000') await s.db.migrate.down();
      const [a, b, c] = (await s.db('units').orderBy('id').limit(3).select('id')).map((r: { id: number }) => r.id) as [
        number,
        number,
        number,
      ];
      const crew = (await s.db('users').where({ email: 'crew1@saltmarsh.example' }).first('id')).id;
      const admin = (await s.db('users').where({ email: 'admin@saltmarsh.example' }).first('id')).id;
      const issuedAt = new Date('2026-11-30T08:15:00.000Z');
      await s.db('commands').insert({
        id: 'old-hold-1',
        unit_id: a,
        kind: 'hold',
        params: null,
        status: 'completed',
        reason: null,
        issued_by: crew,
        issued_at: issuedAt,
        sent_at: issuedAt,
        acked_at: issuedAt,
        finished_at: issuedAt,
      });
      await s.db('units').whereIn('id', [a, b]).update({ on_hold: true });
      await s.db.migrate.latest();

      const holds = await s.db('unit_holds').orderBy('unit_id');
      expect(
        holds.map((h: { unit_id: number; holder_id: number; placed_by: number; command_id: string | null }) => [
          h.unit_id,
          h.holder_id,
          h.placed_by,
          h.command_id,
        ]),
      ).toEqual([
        [a, crew, crew, 'old-hold-1'],
        [b, admin, admin, null],
      ]);
      expect(holds[0].placed_at.toISOString()).toBe(issuedAt.toISOString());
      expect(holds[1].note).toMatch(/not known/);
      expect(holds.some((h: { unit_id: number }) => h.unit_id === c)).toBe(false);
      const columns = Object.keys(await s.db('units').columnInfo());
      expect(columns).not.toContain('on_hold');
    } finally {
      await s.drop();
    }
  });
});
