import type { Knex } from 'knex';

/**
 * Photos and documents of a ticket. The bytes live in the object store (S3 API) under random keys (`object_key`, and
 * `thumb_key` for an image's thumbnail); this row says whose they are. Photos are stored without metadata, so the time
 * and place their camera recorded are kept here (`taken_at` UTC, `latitude_deg`/`longitude_deg` WGS 84), null when the
 * camera recorded none. `sha256` is of the stored bytes.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('ticket_files', (t) => {
    t.increments('id').primary();
    t.integer('ticket_id').unsigned().notNullable().references('tickets.id');
    t.string('object_key', 100).notNullable().unique();
    t.string('thumb_key', 100).nullable().unique();
    t.string('content_type', 40).notNullable();
    t.string('file_name', 160).notNullable();
    t.integer('size_bytes').unsigned().notNullable();
    t.specificType('sha256', 'CHAR(64)').notNullable();
    t.string('caption', 500).nullable();
    t.integer('width_px').unsigned().nullable();
    t.integer('height_px').unsigned().nullable();
    t.integer('uploaded_by').unsigned().nullable().references('users.id');
    t.datetime('uploaded_at', { precision: 3 }).notNullable();
    t.datetime('taken_at', { precision: 3 }).nullable();
    t.double('latitude_deg').nullable();
    t.double('longitude_deg').nullable();
    t.index(['ticket_id', 'id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('ticket_files');
}
