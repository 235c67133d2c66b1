import type { Knex } from 'knex';

/** Dashboard notifications, one row per person; `read_at` null while unread. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('notifications', (t) => {
    t.increments('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.string('kind', 32).notNullable();
    t.string('title', 300).notNullable();
    t.string('body', 4000).notNullable();
    t.integer('ticket_id').unsigned().nullable().references('tickets.id').onDelete('CASCADE');
    t.integer('site_id').unsigned().nullable().references('sites.id').onDelete('CASCADE');
    t.datetime('created_at', { precision: 3 }).notNullable();
    t.datetime('read_at', { precision: 3 }).nullable();
    t.index(['user_id', 'read_at', 'id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('notifications');
}
