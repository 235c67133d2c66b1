import type { Knex } from 'knex';

/** The command sweep looks for open commands every second: find them without reading the whole history. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('commands', (t) => {
    t.index(['status'], 'commands_status_index');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('commands', (t) => {
    t.dropIndex(['status'], 'commands_status_index');
  });
}
