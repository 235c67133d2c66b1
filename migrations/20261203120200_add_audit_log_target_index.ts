import type { Knex } from 'knex';

/** The audit log is read newest first, filtered by target: an index on (target, at) keeps that one range read. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.index(['target', 'at'], 'audit_log_target_at');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.dropIndex(['target', 'at'], 'audit_log_target_at');
  });
}
