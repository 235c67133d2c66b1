import type { Knex } from 'knex';

/**
 * What has been told about a ticket, once each: the on-call page of a P1, its escalation, and each SLA clock's breach
 * (`breach-acknowledge`, `breach-onSite`, `breach-fix`). The primary key makes "once" hold across sweeps and restarts.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('ticket_notices', (t) => {
    t.integer('ticket_id').unsigned().notNullable().references('tickets.id').onDelete('CASCADE');
    t.string('notice', 24).notNullable();
    t.datetime('at', { precision: 3 }).notNullable();
    t.primary(['ticket_id', 'notice']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('ticket_notices');
}
