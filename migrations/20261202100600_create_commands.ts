import type { Knex } from 'knex';

/** Commands to units: who issued what, when, and what became of it (queued → sent → acknowledged/rejected/timed-out). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('commands', (t) => {
    t.string('id', 36).primary();
    t.integer('unit_id').unsigned().notNullable().references('units.id');
    t.string('kind', 16).notNullable();
    t.json('params').nullable();
    t.string('status', 16).notNullable();
    t.string('reason', 200).nullable();
    t.integer('issued_by').unsigned().notNullable().references('users.id');
    t.datetime('issued_at', { precision: 3 }).notNullable();
    t.datetime('sent_at', { precision: 3 }).nullable();
    t.datetime('acked_at', { precision: 3 }).nullable();
    t.datetime('finished_at', { precision: 3 }).nullable();
    t.index(['unit_id', 'issued_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('commands');
}
