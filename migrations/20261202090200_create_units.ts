import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('units', (t) => {
    t.increments('id').primary();
    t.string('serial', 32).notNullable().unique();
    t.integer('site_id').unsigned().notNullable().references('sites.id').onDelete('RESTRICT');
    t.double('rated_power_wp').notNullable();
    t.double('detector_tilt_deg').notNullable();
    t.double('tilt_min_deg').notNullable().defaultTo(0);
    t.double('tilt_max_deg').notNullable().defaultTo(90);
    t.double('azimuth_min_deg').notNullable().defaultTo(0);
    t.double('azimuth_max_deg').notNullable().defaultTo(360);
    t.double('plan_x_m').notNullable().defaultTo(0);
    t.double('plan_y_m').notNullable().defaultTo(0);
    t.string('firmware', 32).notNullable();
    t.boolean('disabled').notNullable().defaultTo(false);
    // SHA-256 of the MQTT device secret, stored as `sha256:<hex>` (server/services/device-secret.ts: the secret is 32 random
    // bytes, so a fast hash suffices); the secret itself is shown once and never stored.
    t.string('device_secret_hash', 100).notNullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['site_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('units');
}
