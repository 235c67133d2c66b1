import type { Knex } from 'knex';

/** Per-site overrides of the health thresholds (defaults live in server/health/health-settings.ts). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('site_health_settings', (t) => {
    t.integer('site_id').unsigned().primary().references('sites.id');
    t.json('settings').notNullable();
    t.integer('updated_by').unsigned().nullable().references('users.id');
    t.datetime('updated_at', { precision: 3 }).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('site_health_settings');
}
