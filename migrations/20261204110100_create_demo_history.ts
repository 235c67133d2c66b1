import type { Knex } from 'knex';

/**
 * Progress of the demo's generated past: one row per fill (first seeding or a restart's gap). The first phase (rollups,
 * the last day at full rate, alarms) runs before the server starts; `background_from`…`background_to` is the full-rate
 * window still to fill while the product runs, newest day first (`days_done` of `days_total` full-rate days). A first phase
 * left `loading` (stopped) or `failed` is done again at the next start.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('demo_history', (t) => {
    t.increments('id').primary();
    t.datetime('planned_at', { precision: 3 }).notNullable();
    /** Newest stored report when the fill was planned (NULL on first seeding): with planned_at, the plan again. */
    t.datetime('last_report_at', { precision: 3 }).nullable();
    t.string('state', 12).notNullable();
    t.integer('days_total').unsigned().notNullable();
    t.integer('days_done').unsigned().notNullable();
    t.datetime('background_from', { precision: 3 }).nullable();
    t.datetime('background_to', { precision: 3 }).nullable();
    t.string('message', 300).notNullable();
    t.datetime('updated_at', { precision: 3 }).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('demo_history');
}
