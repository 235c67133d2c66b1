import type { Knex } from 'knex';

/** Daily energy per unit in the site's local calendar (IANA zone), summed from `telemetry_15m`. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('energy_daily', (t) => {
    t.integer('unit_id').unsigned().notNullable();
    t.date('local_date').notNullable();
    t.double('energy_wh').notNullable();
    t.integer('minutes').unsigned().notNullable();
    t.primary(['unit_id', 'local_date']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('energy_daily');
}
