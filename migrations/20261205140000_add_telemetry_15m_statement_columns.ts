import type { Knex } from 'knex';

/**
 * What the monthly statements read from each 15-minute bucket, beyond energy: the unit's mean module temperature and
 * orientation, minutes per reported mode (the bucket's missing minutes are `15 − minutes`), and the modelled in-plane
 * irradiance of the bucket (site survey + the bucket's measured weather, at the bucket's midpoint) at the unit's
 * reported orientation, at the best orientation it could reach, on a fixed-tilt twin (latitude tilt facing the equator)
 * and on a sun-following twin (pointing at the sun within the unit's travel). All nullable: older rows and rows written
 * in bulk have none, and the statements say how much of a month was modelled. One ALTER (one DDL statement).
 */
export const MODE_MINUTE_COLUMNS = ['seeking_min', 'settled_min', 'scanning_min', 'stowed_min', 'held_min', 'fault_min'] as const;

export const MODEL_COLUMNS = ['model_unit_wm2', 'model_best_wm2', 'model_fixed_wm2', 'model_sun_wm2'] as const;

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('telemetry_15m', (t) => {
    t.double('module_temp_avg_c').nullable();
    t.double('tilt_avg_deg').nullable();
    t.double('azimuth_avg_deg').nullable();
    for (const c of MODE_MINUTE_COLUMNS) t.double(c).nullable();
    for (const c of MODEL_COLUMNS) t.double(c).nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('telemetry_15m', (t) => {
    t.dropColumns('module_temp_avg_c', 'tilt_avg_deg', 'azimuth_avg_deg', ...MODE_MINUTE_COLUMNS, ...MODEL_COLUMNS);
  });
}
