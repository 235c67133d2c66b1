import type { Knex } from 'knex';

/**
 * Health alarms: at most one active alarm per unit (or site) and kind — the health engine dedupes, the service updates the
 * open row — with first/last seen, raise and clear times, severity P1–P4, and the evidence snapshot as JSON.
 * Site alarms (a site gone dark) have no unit.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('alarms', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').unsigned().nullable().references('units.id');
    t.integer('site_id').unsigned().notNullable().references('sites.id');
    t.string('kind', 24).notNullable();
    t.string('severity', 2).notNullable();
    t.string('state', 16).notNullable();
    t.string('message', 600).notNullable();
    t.string('advice', 600).notNullable();
    t.json('evidence').notNullable();
    t.datetime('first_seen_at', { precision: 3 }).notNullable();
    t.datetime('raised_at', { precision: 3 }).notNullable();
    t.datetime('last_seen_at', { precision: 3 }).notNullable();
    t.datetime('cleared_at', { precision: 3 }).nullable();
    t.string('clear_reason', 100).nullable();
    t.datetime('acknowledged_at', { precision: 3 }).nullable();
    t.integer('acknowledged_by').unsigned().nullable().references('users.id');
    t.index(['site_id', 'state', 'raised_at']);
    t.index(['unit_id', 'raised_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('alarms');
}
