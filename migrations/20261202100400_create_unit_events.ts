import type { Knex } from 'knex';

/** Events the unit reports itself (mode changes, faults, scan samples), idempotent on (unit, ts, kind). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('unit_events', (t) => {
    t.integer('unit_id').unsigned().notNullable();
    t.datetime('ts', { precision: 3 }).notNullable();
    t.string('kind', 24).notNullable();
    t.json('body').notNullable();
    t.primary(['unit_id', 'ts', 'kind']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('unit_events');
}
