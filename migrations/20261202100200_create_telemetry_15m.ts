import type { Knex } from 'knex';

/** Fifteen-minute rollup, recomputed from `telemetry_1m`. `minutes` = minutes with data (for completeness). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('telemetry_15m', (t) => {
    t.integer('unit_id').unsigned().notNullable();
    t.datetime('bucket', { precision: 0 }).notNullable();
    t.integer('minutes').unsigned().notNullable();
    t.integer('samples').unsigned().notNullable();
    t.double('poa_avg_wm2').notNullable();
    t.double('poa_max_wm2').notNullable();
    t.double('dc_power_avg_w').notNullable();
    t.double('energy_wh').notNullable();
    t.primary(['unit_id', 'bucket']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('telemetry_15m');
}
