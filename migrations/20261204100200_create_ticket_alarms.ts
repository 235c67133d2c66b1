import type { Knex } from 'knex';

/** Alarms linked to a ticket, each with its evidence as it was when linked (the alarm row keeps changing while open). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('ticket_alarms', (t) => {
    t.integer('ticket_id').unsigned().notNullable().references('tickets.id');
    t.integer('alarm_id').unsigned().notNullable().references('alarms.id');
    t.json('evidence').notNullable();
    t.datetime('linked_at', { precision: 3 }).notNullable();
    t.primary(['ticket_id', 'alarm_id']);
    t.index(['alarm_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('ticket_alarms');
}
