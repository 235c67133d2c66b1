import type { Knex } from 'knex';

/**
 * Maintenance holds: one row per hold, in force from `placed_at` until `released_at`. A unit may carry several; the
 * holder is a person (a user id) or a ticket (a ticket id, from the work orders). `active_key` is 1 while the hold is in
 * force and NULL after, so the unique key allows one hold in force per holder and unit and any number of released ones.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('unit_holds', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').unsigned().notNullable().references('units.id');
    t.string('holder_kind', 8).notNullable();
    t.integer('holder_id').unsigned().notNullable();
    t.string('note', 500).nullable();
    t.datetime('placed_at', { precision: 3 }).notNullable();
    t.integer('placed_by').unsigned().notNullable().references('users.id');
    /** The hold command stored when the hold was placed. */
    t.string('command_id', 36).nullable();
    t.datetime('released_at', { precision: 3 }).nullable();
    t.integer('released_by').unsigned().nullable().references('users.id');
    t.string('release_reason', 500).nullable();
    t.specificType('active_key', 'TINYINT AS (IF(released_at IS NULL, 1, NULL)) VIRTUAL');
    t.unique(['unit_id', 'holder_kind', 'holder_id', 'active_key'], { indexName: 'unit_holds_one_active_per_holder' });
    t.index(['unit_id', 'released_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('unit_holds');
}
