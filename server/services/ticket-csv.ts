import { csvLine } from '../../shared/csv/csv-field';
import type { TicketView } from '../../shared/contracts/tickets';

const COLUMNS = [
  'ticket_id',
  'site_id',
  'site',
  'unit_serial',
  'kind',
  'severity',
  'title',
  'state',
  'assignee',
  'opened_utc',
  'acknowledged_utc',
  'on_site_utc',
  'resolved_utc',
  'closed_utc',
  'cancelled_utc',
  'acknowledge_due_utc',
  'on_site_due_utc',
  'fix_due_utc',
  'acknowledge_sla',
  'on_site_sla',
  'fix_sla',
  'waiting_reason',
  'closure_component',
  'closure_failure_mode',
  'closure_cause',
  'closure_action',
  'root_cause_class',
  'availability_category',
  'lost_energy_kWh',
] as const;

/**
 * The ticket log as CSV (RFC 4180 via shared/csv): one row per ticket with every state time in UTC (ISO 8601 with `Z`),
 * the SLA due times and whether each clock was met. An empty cell is a time not reached or a value not recorded.
 */
export function ticketLogCsv(tickets: readonly TicketView[]): string {
  let out = csvLine(COLUMNS);
  for (const t of tickets) {
    const clock = (n: string) => t.clocks.find((c) => c.name === n);
    out += csvLine([
      t.id,
      t.siteId,
      t.siteName,
      t.serial,
      t.kind,
      t.severity,
      t.title,
      t.state,
      t.assignee?.name,
      t.openedAt,
      t.acknowledgedAt,
      t.onSiteAt,
      t.resolvedAt,
      t.closedAt,
      t.cancelledAt,
      clock('acknowledge')?.dueAt,
      clock('onSite')?.dueAt,
      clock('fix')?.dueAt,
      clock('acknowledge')?.status,
      clock('onSite')?.status,
      clock('fix')?.status,
      t.waitingReason,
      t.closure?.component,
      t.closure?.failureMode,
      t.closure?.cause,
      t.closure?.action,
      t.closure?.rootCauseClass,
      t.availabilityCategory,
      t.lostEnergyKwh,
    ]);
  }
  return out;
}
