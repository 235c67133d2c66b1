import type { Knex } from 'knex';
import * as m20261202090000 from './20261202090000_create_owners';
import * as m20261202090100 from './20261202090100_create_sites';
import * as m20261202090200 from './20261202090200_create_units';
import * as m20261202090300 from './20261202090300_create_users';
import * as m20261202090400 from './20261202090400_create_audit_log';

/**
 * Every migration, by name. Listed statically (not read from disk) so the same list works under tsx, vitest and a
 * compiled build; add each new file here. One DDL change per file: MariaDB commits DDL implicitly.
 */
const migrations: Record<string, Knex.Migration> = {
  '20261202090000_create_owners': m20261202090000,
  '20261202090100_create_sites': m20261202090100,
  '20261202090200_create_units': m20261202090200,
  '20261202090300_create_users': m20261202090300,
  '20261202090400_create_audit_log': m20261202090400,
};

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(migrations).sort(),
  getMigrationName: (name) => name,
  getMigration: async (name) => migrations[name]!,
};
