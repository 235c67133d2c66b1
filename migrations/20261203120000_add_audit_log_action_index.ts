import type { Knex } from 'knex';

/** The audit log is read newest first, filtered by action: an index on (action, at) keeps that one range read. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.index(['action', 'at'], 'audit_log_action_at');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.dropIndex(['action', 'at'], 'audit_log_action_at');
  });
}
