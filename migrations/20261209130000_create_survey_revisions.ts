import type { Knex } from 'knex';

/**
 * Survey revisions: corrections to a site's survey estimated from its units' scans, one row per site and version.
 * `state`: proposed → accepted | rejected (by a person, with `reason`), or superseded (a newer proposal for the site, or
 * the survey changed under it). `base_*` is the survey and albedo the fit started from (accepting checks the site still
 * has them), `proposed_*` what accepting makes the site's; `fit` the parameters with their uncertainty and bounds, the
 * model error before and after, and the scans used (JSON); `outcome` what accepting did (trap alarms re-evaluated).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('survey_revisions', (t) => {
    t.increments('id').primary();
    t.integer('site_id').unsigned().notNullable().references('id').inTable('sites').onDelete('CASCADE');
    t.integer('version').unsigned().notNullable();
    t.enum('state', ['proposed', 'accepted', 'rejected', 'superseded']).notNullable();
    t.json('base_survey').notNullable();
    t.double('base_albedo').notNullable();
    t.json('proposed_survey').notNullable();
    t.double('proposed_albedo').notNullable();
    t.json('fit').notNullable();
    t.timestamp('proposed_at', { precision: 3 }).notNullable();
    t.integer('proposed_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('decided_at', { precision: 3 }).nullable();
    t.integer('decided_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.string('reason', 500).nullable();
    t.json('outcome').nullable();
    t.unique(['site_id', 'version']);
    t.index(['site_id', 'state']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('survey_revisions');
}
