import type { Knex } from 'knex';

/** One-minute rollup of `telemetry`, recomputed from raw rows whenever a minute receives data (late data included).
 * energy_wh = mean DC power of the minute's samples × 1 min. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('telemetry_1m', (t) => {
    t.integer('unit_id').unsigned().notNullable();
    t.datetime('bucket', { precision: 0 }).notNullable();
    t.integer('samples').unsigned().notNullable();
    t.double('poa_avg_wm2').notNullable();
    t.double('poa_max_wm2').notNullable();
    t.double('dc_power_avg_w').notNullable();
    t.double('energy_wh').notNullable();
    t.double('tilt_avg_deg').notNullable();
    t.double('azimuth_avg_deg').notNullable();
    t.double('module_temp_avg_c').notNullable();
    t.primary(['unit_id', 'bucket']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('telemetry_1m');
}
