import type { Knex } from 'knex';

/**
 * Sign-in attempts per key (account, client address) in the current minute, shared by every server so a limit holds
 * across them. The columns are the ones rate-limiter-flexible's MySQL store reads and writes (`expire` in epoch ms).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sign_in_attempts', (t) => {
    t.string('key', 255).notNullable().primary();
    t.integer('points').notNullable().defaultTo(0);
    t.bigInteger('expire').unsigned().nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sign_in_attempts');
}
