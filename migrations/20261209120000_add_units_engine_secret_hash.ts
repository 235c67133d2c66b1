import type { Knex } from 'knex';

/**
 * A bcrypt hash of the unit's device secret, for the external message engine (NATS accepts plain or bcrypt passwords,
 * not the SHA-256 the built-in broker checks). Written whenever a secret is set; null for secrets set before, which the
 * engine cannot check until the secret is rotated.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.string('engine_secret_hash', 60).nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('units', (t) => {
    t.dropColumn('engine_secret_hash');
  });
}
