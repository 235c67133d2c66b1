import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('owners', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable().unique();
    t.string('contact_email', 254).nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('owners');
}
