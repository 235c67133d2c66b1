import type { Knex } from 'knex';

/**
 * One row per sign-in. The session token names its row, so a session ends when the row says so (signed out, or
 * revoked when the user is disabled, changes role or owner, or changes password) and not only when the token expires.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sessions', (t) => {
    t.string('id', 32).primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('expires_at', { precision: 3 }).notNullable();
    t.timestamp('revoked_at', { precision: 3 }).nullable();
    t.index(['user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sessions');
}
