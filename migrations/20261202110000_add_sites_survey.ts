import type { Knex } from 'knex';

/** The site survey: horizon profile, facade reflectors, indoor lamps and the usual sky type (JSON, validated by the API). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('sites', (t) => {
    t.json('survey').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('sites', (t) => {
    t.dropColumn('survey');
  });
}
