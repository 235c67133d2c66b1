import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sites', (t) => {
    t.increments('id').primary();
    t.integer('owner_id').unsigned().notNullable().references('owners.id').onDelete('RESTRICT');
    t.string('name', 120).notNullable().unique();
    t.double('latitude_deg').notNullable();
    t.double('longitude_deg').notNullable();
    t.double('elevation_m').notNullable().defaultTo(0);
    t.string('time_zone', 64).notNullable();
    t.double('albedo').notNullable().defaultTo(0.2);
    t.boolean('indoor').notNullable().defaultTo(false);
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sites');
}
