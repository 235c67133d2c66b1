import type { Knex } from 'knex';

/** The daily digest went to this person for this local date (once a day, across restarts). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('digest_runs', (t) => {
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.date('local_date').notNullable();
    t.datetime('at', { precision: 3 }).notNullable();
    t.primary(['user_id', 'local_date']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('digest_runs');
}
