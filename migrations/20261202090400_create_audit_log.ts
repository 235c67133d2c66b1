import type { Knex } from 'knex';

/** Append-only trail of who changed what: sign-ins, configuration changes, commands. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id').primary();
    t.timestamp('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.integer('user_id').unsigned().nullable();
    t.string('action', 64).notNullable();
    t.string('target', 128).nullable();
    t.json('detail').nullable();
    t.index(['at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_log');
}
