import type { Knex } from 'knex';

/**
 * When each unit was last heard, by whichever server heard it (arrival, the unit's own timestamp, a last will): the
 * server that runs the comms watch reads it, so it judges units whose reports went to another server.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('unit_heard', (t) => {
    t.integer('unit_id').unsigned().notNullable().primary();
    t.datetime('heard_at', { precision: 3 }).notNullable();
    t.datetime('ts', { precision: 3 }).notNullable();
    t.datetime('offline_at', { precision: 3 }).nullable();
    t.datetime('written_at', { precision: 3 }).notNullable().index();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('unit_heard');
}
