import type { Knex } from 'knex';

/** The on-call rota: who is on call from when to when, for one site or (site_id null) the whole fleet. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('on_call', (t) => {
    t.increments('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.integer('site_id').unsigned().nullable().references('sites.id').onDelete('CASCADE');
    t.datetime('from_at', { precision: 3 }).notNullable();
    t.datetime('to_at', { precision: 3 }).notNullable();
    t.index(['from_at', 'to_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('on_call');
}
