import type { Knex } from 'knex';

/** Whether the unit carries its site's weather station: only that unit may publish the site's `weather` (gusts raise stow alarms). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.boolean('weather_station').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.dropColumn('weather_station');
  });
}
