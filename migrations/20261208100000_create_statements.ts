import type { Knex } from 'knex';

/**
 * Locked monthly statements: one row per site, month and version. Version 1 is the automatic lock (on the 3rd at 06:00
 * site time); each restatement adds the next version and marks the one before `superseded` (still readable). `content`
 * is the canonical JSON of the statement (keys sorted) and `checksum` its SHA-256 in hex. `locked_by` null = the
 * automatic lock; `silent` = locked without mailing the owner (the demo's past, months older than the newest due one);
 * `restatement_suggested_at` = when data for the month arrived after it was locked.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('statements', (t) => {
    t.increments('id').primary();
    t.integer('site_id').unsigned().notNullable().references('id').inTable('sites').onDelete('CASCADE');
    t.string('month', 7).notNullable();
    t.integer('version').unsigned().notNullable();
    t.enum('state', ['locked', 'superseded']).notNullable();
    t.specificType('content', 'LONGTEXT').notNullable();
    t.string('checksum', 64).notNullable();
    t.timestamp('locked_at', { precision: 3 }).notNullable();
    t.integer('locked_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.string('reason', 500).nullable();
    t.boolean('silent').notNullable().defaultTo(false);
    t.timestamp('restatement_suggested_at', { precision: 3 }).nullable();
    t.unique(['site_id', 'month', 'version']);
    t.index(['state']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('statements');
}
