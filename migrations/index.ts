import type { Knex } from 'knex';
import * as m20261202090000 from './20261202090000_create_owners';
import * as m20261202090100 from './20261202090100_create_sites';
import * as m20261202090200 from './20261202090200_create_units';
import * as m20261202090300 from './20261202090300_create_users';
import * as m20261202090400 from './20261202090400_create_audit_log';
import * as m20261202100000 from './20261202100000_create_telemetry';
import * as m20261202100100 from './20261202100100_create_telemetry_1m';
import * as m20261202100200 from './20261202100200_create_telemetry_15m';
import * as m20261202100300 from './20261202100300_create_energy_daily';
import * as m20261202100400 from './20261202100400_create_unit_events';
import * as m20261202100500 from './20261202100500_create_weather';
import * as m20261202100600 from './20261202100600_create_commands';
import * as m20261202100700 from './20261202100700_add_units_hold';
import * as m20261202110000 from './20261202110000_add_sites_survey';
import * as m20261202120000 from './20261202120000_create_alarms';
import * as m20261202120100 from './20261202120100_create_site_health_settings';
import * as m20261202130000 from './20261202130000_add_telemetry_1m_extremes';
import * as m20261203100000 from './20261203100000_create_unit_holds';
import * as m20261203100100 from './20261203100100_carry_over_units_hold';
import * as m20261203100200 from './20261203100200_drop_units_on_hold';
import * as m20261203100300 from './20261203100300_add_commands_seq';
import * as m20261203100400 from './20261203100400_add_commands_status_index';
import * as m20261203110000 from './20261203110000_create_sessions';
import * as m20261203120000 from './20261203120000_add_audit_log_action_index';
import * as m20261203120100 from './20261203120100_add_audit_log_user_index';
import * as m20261203120200 from './20261203120200_add_audit_log_target_index';
import * as m20261203140000 from './20261203140000_add_units_weather_station';
import * as m20261204100000 from './20261204100000_create_tickets';
import * as m20261204100100 from './20261204100100_create_ticket_transitions';
import * as m20261204100200 from './20261204100200_create_ticket_alarms';
import * as m20261204100300 from './20261204100300_create_owner_sla';
import * as m20261204110000 from './20261204110000_create_ticket_files';
import * as m20261204110100 from './20261204110100_create_demo_history';
import * as m20261207100000 from './20261207100000_create_mail_outbox';
import * as m20261207100100 from './20261207100100_create_notification_settings';
import * as m20261207100200 from './20261207100200_create_on_call';
import * as m20261207100300 from './20261207100300_create_notifications';
import * as m20261207100400 from './20261207100400_create_ticket_notices';
import * as m20261207100500 from './20261207100500_create_digest_runs';
import * as m20261205140000 from './20261205140000_add_telemetry_15m_statement_columns';
import * as m20261208100000 from './20261208100000_create_statements';
import * as m20261209100000 from './20261209100000_create_sign_in_attempts';
import * as m20261209100100 from './20261209100100_create_unit_heard';
import * as m20261209110000 from './20261209110000_partition_telemetry_by_month';
import * as m20261209120000 from './20261209120000_add_units_engine_secret_hash';
import * as m20261209130000 from './20261209130000_create_survey_revisions';

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
  '20261202100000_create_telemetry': m20261202100000,
  '20261202100100_create_telemetry_1m': m20261202100100,
  '20261202100200_create_telemetry_15m': m20261202100200,
  '20261202100300_create_energy_daily': m20261202100300,
  '20261202100400_create_unit_events': m20261202100400,
  '20261202100500_create_weather': m20261202100500,
  '20261202100600_create_commands': m20261202100600,
  '20261202100700_add_units_hold': m20261202100700,
  '20261202110000_add_sites_survey': m20261202110000,
  '20261202120000_create_alarms': m20261202120000,
  '20261202120100_create_site_health_settings': m20261202120100,
  '20261202130000_add_telemetry_1m_extremes': m20261202130000,
  '20261203100000_create_unit_holds': m20261203100000,
  '20261203100100_carry_over_units_hold': m20261203100100,
  '20261203100200_drop_units_on_hold': m20261203100200,
  '20261203100300_add_commands_seq': m20261203100300,
  '20261203100400_add_commands_status_index': m20261203100400,
  '20261203110000_create_sessions': m20261203110000,
  '20261203120000_add_audit_log_action_index': m20261203120000,
  '20261203120100_add_audit_log_user_index': m20261203120100,
  '20261203120200_add_audit_log_target_index': m20261203120200,
  '20261203140000_add_units_weather_station': m20261203140000,
  '20261204100000_create_tickets': m20261204100000,
  '20261204100100_create_ticket_transitions': m20261204100100,
  '20261204100200_create_ticket_alarms': m20261204100200,
  '20261204100300_create_owner_sla': m20261204100300,
  '20261204110000_create_ticket_files': m20261204110000,
  '20261204110100_create_demo_history': m20261204110100,
  '20261207100000_create_mail_outbox': m20261207100000,
  '20261207100100_create_notification_settings': m20261207100100,
  '20261207100200_create_on_call': m20261207100200,
  '20261207100300_create_notifications': m20261207100300,
  '20261207100400_create_ticket_notices': m20261207100400,
  '20261207100500_create_digest_runs': m20261207100500,
  '20261205140000_add_telemetry_15m_statement_columns': m20261205140000,
  '20261208100000_create_statements': m20261208100000,
  '20261209100000_create_sign_in_attempts': m20261209100000,
  '20261209100100_create_unit_heard': m20261209100100,
  '20261209110000_partition_telemetry_by_month': m20261209110000,
  '20261209120000_add_units_engine_secret_hash': m20261209120000,
  '20261209130000_create_survey_revisions': m20261209130000,
};

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(migrations).sort(),
  getMigrationName: (name) => name,
  getMigration: async (name) => migrations[name]!,
};
