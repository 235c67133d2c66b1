import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    t.string('email', 254).notNullable().unique();
    t.string('name', 120).notNullable();
    t.enu('role', ['admin', 'engineer', 'technician', 'crew', 'owner']).notNullable();
    // Set for owner users only: the owner whose sites they may see.
    t.integer('owner_id').unsigned().nullable().references('owners.id').onDelete('RESTRICT');
    t.string('password_hash', 100).notNullable();
    t.boolean('disabled').notNullable().defaultTo(false);
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('users');
}
