import type { Knex } from 'knex';

/**
 * A person's choice of notifications. No row means the defaults (every site they may see, every severity, by e-mail
 * and in the dashboard). `site_ids` null means every site in the person's scope.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('notification_settings', (t) => {
    t.integer('user_id').unsigned().primary().references('users.id').onDelete('CASCADE');
    t.json('site_ids').nullable();
    t.json('severities').notNullable();
    t.boolean('by_email').notNullable();
    t.boolean('in_dashboard').notNullable();
    t.datetime('updated_at', { precision: 3 }).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('notification_settings');
}
