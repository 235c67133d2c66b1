import type { Knex } from 'knex';

/** Maintenance hold as the server knows it: set when a unit confirms a hold, cleared when it confirms the release. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.boolean('on_hold').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.dropColumn('on_hold');
  });
}
