import type { Knex } from 'knex';

/** The audit log is read newest first, filtered by person: an index on (user_id, at) keeps that one range read. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.index(['user_id', 'at'], 'audit_log_user_id_at');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.dropIndex(['user_id', 'at'], 'audit_log_user_id_at');
  });
}
