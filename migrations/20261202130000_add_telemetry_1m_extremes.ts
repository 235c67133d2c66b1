import type { Knex } from 'knex';

/** Per-minute minimum and maximum of each traced quantity, so long trace ranges read minutes instead of raw reports. */
export const EXTREME_COLUMNS = [
  'tilt_plus_wm2',
  'tilt_minus_wm2',
  'azimuth_plus_wm2',
  'azimuth_minus_wm2',
  'tilt_diff_wm2',
  'azimuth_diff_wm2',
  'tilt_deg',
  'cmd_tilt_deg',
  'azimuth_deg',
  'cmd_azimuth_deg',
  'poa_wm2',
  'dc_power_w',
] as const;

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('telemetry_1m', (t) => {
    for (const c of EXTREME_COLUMNS) {
      t.float(`${c}_min`).nullable();
      t.float(`${c}_max`).nullable();
    }
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('telemetry_1m', (t) => {
    for (const c of EXTREME_COLUMNS) t.dropColumns(`${c}_min`, `${c}_max`);
  });
}
