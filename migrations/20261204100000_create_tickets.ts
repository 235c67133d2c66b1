import type { Knex } from 'knex';

/**
 * Work orders. A ticket is for a unit or a whole site (unit_id null); `version` is the optimistic lock every transition
 * checks. Due times are fixed from the SLA clocks when the ticket opens. `fault_key` (unit or site + kind) finds the
 * ticket of a fault again when its alarm is raised anew, so one fault keeps one ticket.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('tickets', (t) => {
    t.increments('id').primary();
    t.integer('site_id').unsigned().notNullable().references('sites.id');
    t.integer('unit_id').unsigned().nullable().references('units.id');
    t.string('kind', 24).notNullable();
    t.string('severity', 2).notNullable();
    t.string('title', 200).notNullable();
    t.string('description', 4000).nullable();
    t.string('state', 16).notNullable();
    t.integer('version').unsigned().notNullable().defaultTo(1);
    t.integer('assignee_id').unsigned().nullable().references('users.id');
    t.string('fault_key', 80).nullable();
    t.datetime('opened_at', { precision: 3 }).notNullable();
    t.integer('opened_by').unsigned().nullable().references('users.id');
    t.datetime('acknowledge_due_at', { precision: 3 }).notNullable();
    t.datetime('on_site_due_at', { precision: 3 }).notNullable();
    t.datetime('fix_due_at', { precision: 3 }).notNullable();
    t.datetime('acknowledged_at', { precision: 3 }).nullable();
    t.datetime('on_site_at', { precision: 3 }).nullable();
    t.datetime('resolved_at', { precision: 3 }).nullable();
    t.datetime('closed_at', { precision: 3 }).nullable();
    t.datetime('cancelled_at', { precision: 3 }).nullable();
    t.string('waiting_reason', 16).nullable();
    t.json('closure').nullable();
    t.string('availability_category', 40).notNullable();
    t.double('lost_energy_kwh').nullable();
    t.json('parts').notNullable();
    t.index(['site_id', 'state']);
    t.index(['assignee_id', 'state']);
    t.index(['fault_key', 'opened_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('tickets');
}
