import type { Knex } from 'knex';

/**
 * Every e-mail the server sends, with its delivery: `queued` until the mail service takes it, then `sent`, or `failed`
 * once the last attempt has failed (`last_error` says why). Kept in production too: the admins' outbox reads it.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('mail_outbox', (t) => {
    t.increments('id').primary();
    t.string('kind', 32).notNullable();
    t.string('to_addresses', 2000).notNullable();
    t.string('subject', 300).notNullable();
    t.text('body').notNullable();
    t.json('attachments').notNullable();
    t.string('status', 8).notNullable();
    t.integer('attempts').unsigned().notNullable().defaultTo(0);
    t.string('last_error', 1000).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable();
    t.datetime('sent_at', { precision: 3 }).nullable();
    t.index(['created_at']);
    t.index(['status', 'created_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('mail_outbox');
}
