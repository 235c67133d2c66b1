import type { Knex } from 'knex';

/**
 * Issue order of commands: queued commands go out ordered by `issued_at`, then `seq`, so two commands issued within the
 * same millisecond keep the order in which they were stored.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE `commands` ADD COLUMN `seq` BIGINT UNSIGNED NOT NULL AUTO_INCREMENT UNIQUE');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE `commands` DROP COLUMN `seq`');
}
