import type { Knex } from 'knex';

/** Site weather station readings (published by the unit that carries the station). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('weather', (t) => {
    t.integer('site_id').unsigned().notNullable();
    t.datetime('ts', { precision: 3 }).notNullable();
    t.float('ghi_wm2').notNullable();
    t.float('dhi_wm2').nullable();
    t.float('air_temp_c').notNullable();
    t.float('wind_ms').notNullable();
    t.float('gust_ms').notNullable();
    t.primary(['site_id', 'ts']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('weather');
}
