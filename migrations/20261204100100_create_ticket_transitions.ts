import type { Knex } from 'knex';

/** Every move of a ticket, its opening included (from_state null): who (null = automatic), when, note and reason. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('ticket_transitions', (t) => {
    t.increments('id').primary();
    t.integer('ticket_id').unsigned().notNullable().references('tickets.id');
    t.string('from_state', 16).nullable();
    t.string('to_state', 16).notNullable();
    t.datetime('at', { precision: 3 }).notNullable();
    t.integer('by_user').unsigned().nullable().references('users.id');
    t.string('note', 2000).nullable();
    t.string('reason', 500).nullable();
    t.integer('assignee_id').unsigned().nullable().references('users.id');
    t.index(['ticket_id', 'id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('ticket_transitions');
}
