import type { Knex } from 'knex';

/** The single hold flag gives way to the holds table (a unit is held while any hold in it is in force). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.dropColumn('on_hold');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.boolean('on_hold').notNullable().defaultTo(false);
  });
}
