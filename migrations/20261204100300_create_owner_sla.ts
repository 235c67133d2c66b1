import type { Knex } from 'knex';

/** An owner's contracted SLA targets per severity [minutes]; severities without a row use the defaults. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('owner_sla', (t) => {
    t.integer('owner_id').unsigned().notNullable().references('owners.id');
    t.string('severity', 2).notNullable();
    t.integer('acknowledge_min').unsigned().notNullable();
    t.integer('on_site_min').unsigned().notNullable();
    t.integer('fix_min').unsigned().notNullable();
    t.primary(['owner_id', 'severity']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('owner_sla');
}
