import type { Knex } from 'knex';

/** Raw unit reports, one row per (unit, unit timestamp): the key makes resends idempotent. UTC, millisecond precision. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('telemetry', (t) => {
    t.integer('unit_id').unsigned().notNullable();
    t.datetime('ts', { precision: 3 }).notNullable();
    t.bigInteger('seq').unsigned().notNullable();
    t.float('tilt_plus_wm2').notNullable();
    t.float('tilt_minus_wm2').notNullable();
    t.float('azimuth_plus_wm2').notNullable();
    t.float('azimuth_minus_wm2').notNullable();
    t.float('poa_wm2').notNullable();
    t.float('tilt_deg').notNullable();
    t.float('azimuth_deg').notNullable();
    t.float('cmd_tilt_deg').notNullable();
    t.float('cmd_azimuth_deg').notNullable();
    t.float('tilt_motor_a').notNullable();
    t.float('azimuth_motor_a').notNullable();
    t.float('dc_power_w').notNullable();
    t.float('module_temp_c').notNullable();
    t.string('mode', 12).notNullable();
    t.datetime('received_at', { precision: 3 }).notNullable();
    t.primary(['unit_id', 'ts']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('telemetry');
}
