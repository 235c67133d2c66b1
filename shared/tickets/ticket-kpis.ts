/**
 * Work-order KPIs of one site and month (pure). Time measures follow the O&M-contractor KPI set of the SolarPower Europe
 * O&M Best Practice Guidelines (acknowledgement, intervention, response = acknowledgement + intervention, resolution),
 * with one stated difference: acknowledgement time runs from the ticket's opening (not the alarm) to the crew member's
 * acknowledgement, since that is what the dispatch clock measures here. MTTR, SLA compliance, first-time fix and repeat
 * repairs within 90 days are common practice; their exact definitions are in KPI_HELP.
 */

export interface KpiTicket {
  id: number;
  faultKey: string | null;
  openedAtMs: number;
  acknowledgedAtMs: number | null;
  onSiteAtMs: number | null;
  resolvedAtMs: number | null;
  state: string;
  /** SLA clocks: due time and when met (null = not met yet). */
  clocks: { dueAtMs: number; metAtMs: number | null }[];
  /** Check-ins of the ticket (on-site transitions). */
  visits: number;
  /** Whether a ticket for the same fault opened within 90 days after this one was resolved (or it was reopened). */
  repeated: boolean;
}

export interface DurationStat {
  /** How many tickets had both ends of the interval. */
  n: number;
  meanMin: number | null;
  medianMin: number | null;
}

export interface TicketKpis {
  opened: number;
  resolved: number;
  cancelled: number;
  acknowledgement: DurationStat;
  intervention: DurationStat;
  response: DurationStat;
  resolution: DurationStat;
  /** Mean time to repair: opening → resolution of the resolved tickets [h]. */
  mttrH: number | null;
  /** Clocks met on time ÷ clocks that came due or were met, in % (null when none). */
  slaCompliancePct: number | null;
  slaClocksCounted: number;
  /** Resolved with one visit and not repeated ÷ resolved, in %. */
  firstTimeFixPct: number | null;
  /** Resolved tickets whose fault came back within 90 days ÷ resolved, in %. */
  repeatRepairPct: number | null;
}

export const KPI_HELP: Record<keyof Omit<TicketKpis, 'opened' | 'resolved' | 'cancelled' | 'slaClocksCounted'>, string> = {
  acknowledgement: "From the ticket's opening to the assigned crew member's acknowledgement.",
  intervention: 'From the acknowledgement to the check-in on site.',
  response: 'Acknowledgement plus intervention: from opening to arrival on site.',
  resolution: 'From the check-in on site to the fix (resolved).',
  mttrH: "Mean time to repair: from the ticket's opening to its resolution, over the tickets resolved.",
  slaCompliancePct: 'Share of SLA clocks (acknowledge, on site, fix) met by their due time, of those that came due or were met.',
  firstTimeFixPct: 'Share of resolved tickets fixed in one visit whose fault did not come back within 90 days.',
  repeatRepairPct: 'Share of resolved tickets whose fault came back (a new or reopened ticket) within 90 days.',
};

const MIN = 60_000;

function stat(values: number[]): DurationStat {
  if (!values.length) return { n: 0, meanMin: null, medianMin: null };
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  const median = sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
  const round = (x: number) => Math.round(x * 10) / 10;
  return { n: values.length, meanMin: round(values.reduce((s, v) => s + v, 0) / values.length / MIN), medianMin: round(median / MIN) };
}

const pct = (num: number, den: number) => (den ? Math.round((num / den) * 1000) / 10 : null);

/** KPIs over the tickets opened in the period; `nowMs` decides which running clocks have come due. */
export function ticketKpis(tickets: readonly KpiTicket[], nowMs: number): TicketKpis {
  const span = (a: (t: KpiTicket) => number | null, b: (t: KpiTicket) => number | null) =>
    stat(tickets.flatMap((t) => (a(t) !== null && b(t) !== null ? [b(t)! - a(t)!] : [])));
  const resolved = tickets.filter((t) => t.resolvedAtMs !== null);
  const clocks = tickets.flatMap((t) => t.clocks).filter((c) => c.metAtMs !== null || c.dueAtMs <= nowMs);
  return {
    opened: tickets.length,
    resolved: resolved.length,
    cancelled: tickets.filter((t) => t.state === 'cancelled').length,
    acknowledgement: span(
      (t) => t.openedAtMs,
      (t) => t.acknowledgedAtMs,
    ),
    intervention: span(
      (t) => t.acknowledgedAtMs,
      (t) => t.onSiteAtMs,
    ),
    response: span(
      (t) => (t.acknowledgedAtMs !== null ? t.openedAtMs : null),
      (t) => (t.acknowledgedAtMs !== null ? t.onSiteAtMs : null),
    ),
    resolution: span(
      (t) => t.onSiteAtMs,
      (t) => t.resolvedAtMs,
    ),
    mttrH: resolved.length
      ? Math.round((resolved.reduce((s, t) => s + (t.resolvedAtMs! - t.openedAtMs), 0) / resolved.length / 3600_000) * 100) / 100
      : null,
    slaCompliancePct: pct(clocks.filter((c) => c.metAtMs !== null && c.metAtMs <= c.dueAtMs).length, clocks.length),
    slaClocksCounted: clocks.length,
    firstTimeFixPct: pct(resolved.filter((t) => t.visits <= 1 && !t.repeated).length, resolved.length),
    repeatRepairPct: pct(resolved.filter((t) => t.repeated).length, resolved.length),
  };
}
