import type { Knex } from 'knex';
import { ALARM_SEVERITIES, type AlarmSeverity } from '../shared/contracts/alarms';
import { DEFAULT_SLA, defaultCategoryOf, faultKeyOf, type ClosureAction, type TicketClosure } from '../shared/contracts/tickets';

/**
 * The work the demo's past faults would have caused: for every cleared alarm of the demo history that the rules would
 * have ticketed (P1 and P2 at once, P3 open for 4 h or more), a ticket that was dispatched, acknowledged, worked on site
 * (with its hold, released at check-out), resolved when the fault cleared and closed a day later; a fault back within
 * 7 days of its resolution reopens the same ticket. Written in bulk, never through the live rules: the past pages nobody.
 * Deterministic: every time offset comes from the alarm's id. Idempotent: alarms already linked to a ticket are skipped.
 */
export interface DemoTicketOptions {
  /** Tickets resolved less than a day before this stay resolved (not yet closed). */
  now: Date;
}

const MIN = 60_000;
const HOUR = 3600_000;
const DAY = 86_400_000;
const P3_DELAY_MS = 4 * HOUR;
const REOPEN_WITHIN_MS = 7 * DAY;

/** What a crew would write for each fault kind (invented, plain). */
const CLOSURES: Record<string, { closure: Omit<TicketClosure, 'action'>; action: ClosureAction; note: string }> = {
  stall: {
    closure: { component: 'tilt drive', failureMode: 'stalls under load', cause: 'worn gearbox bearing', rootCauseClass: 'o-and-m' },
    action: 'repair',
    note: 'Bearing replaced and gearbox greased; drive runs freely through its travel.',
  },
  drift: {
    closure: {
      component: 'detector pair',
      failureMode: 'one detector reads low',
      cause: 'dirt film on the detector window',
      rootCauseClass: 'environment',
    },
    action: 'clean',
    note: 'Detector windows cleaned; the pair reads within 2 % of each other again.',
  },
  trap: {
    closure: {
      component: 'tracking controller',
      failureMode: 'settled on a lesser peak',
      cause: 'detector tilt too narrow for the sky',
      rootCauseClass: 'design',
    },
    action: 'adjust',
    note: 'Re-searched the sky from the unit and widened the detector tilt.',
  },
  hunting: {
    closure: {
      component: 'tracking controller',
      failureMode: 'oscillates around the peak',
      cause: 'deadband set too small',
      rootCauseClass: 'installation',
    },
    action: 'adjust',
    note: 'Deadband raised; the unit now settles.',
  },
  comms: {
    closure: { component: 'radio modem', failureMode: 'no reports', cause: 'modem lost power after a brown-out', rootCauseClass: 'grid' },
    action: 'reset',
    note: 'Modem power-cycled; reports arrive every 5 s again.',
  },
  'site-comms': {
    closure: {
      component: 'site router',
      failureMode: 'whole site silent',
      cause: 'router power supply failed',
      rootCauseClass: 'manufacturing',
    },
    action: 'replace',
    note: 'Router power supply replaced; every unit reports again.',
  },
  soiling: {
    closure: {
      component: 'modules',
      failureMode: 'output below clean reference',
      cause: 'dust after a dry spell',
      rootCauseClass: 'environment',
    },
    action: 'clean',
    note: 'Modules washed with deionised water.',
  },
  'not-stowed': {
    closure: {
      component: 'stow drive',
      failureMode: 'did not reach stow in wind',
      cause: 'limit switch stuck',
      rootCauseClass: 'manufacturing',
    },
    action: 'replace',
    note: 'Limit switch replaced; stow tested twice.',
  },
};
const FALLBACK = {
  closure: { component: 'unit', failureMode: 'fault reported', cause: 'not found on site' },
  action: 'no-fault-found' as ClosureAction,
  note: 'Inspected on site; nothing wrong found.',
};

interface PastAlarm {
  id: number;
  unit_id: number | null;
  site_id: number;
  kind: string;
  severity: string;
  message: string;
  evidence: unknown;
  raised_at: Date;
  cleared_at: Date;
}

/** A deterministic fraction in [0, 1) from an alarm id and a salt (Knuth's multiplicative hash). */
const frac = (id: number, salt: number) => (((id * 2654435761 + salt * 40503) >>> 0) % 10_000) / 10_000;

export async function seedDemoTickets(db: Knex, opts: DemoTicketOptions): Promise<number> {
  const crews: { id: number }[] = await db('users').where({ role: 'crew', disabled: false }).orderBy('id').select('id');
  const dispatcher = await db('users').where({ role: 'technician', disabled: false }).orderBy('id').first('id');
  if (!crews.length || !dispatcher) return 0;
  const alarms: PastAlarm[] = await db('alarms as a')
    .leftJoin('ticket_alarms as ta', 'ta.alarm_id', 'a.id')
    .whereNull('ta.alarm_id')
    .where('a.state', 'cleared')
    .whereNotNull('a.cleared_at')
    .whereIn('a.severity', ['P1', 'P2', 'P3'])
    .where('a.raised_at', '<', opts.now)
    .orderBy('a.raised_at')
    .select('a.id', 'a.unit_id', 'a.site_id', 'a.kind', 'a.severity', 'a.message', 'a.evidence', 'a.raised_at', 'a.cleared_at');
  let made = 0;
  await db.transaction(async (trx) => {
    // The latest demo ticket of each fault, to reopen when the fault comes back soon after.
    const lastOfFault = new Map<string, { id: number; resolvedAt: Date; closed: boolean }>();
    for (const a of alarms) {
      const raised = a.raised_at.getTime();
      const cleared = a.cleared_at.getTime();
      const opened = a.severity === 'P3' ? raised + P3_DELAY_MS : raised;
      if (opened >= cleared) continue; // a P3 that cleared before the 4 h rule would have opened a ticket
      const severity = ((ALARM_SEVERITIES as readonly string[]).includes(a.severity) ? a.severity : 'P3') as AlarmSeverity;
      const crew = crews[Math.floor(frac(a.id, 1) * crews.length)]!.id;
      const key = faultKeyOf(a.unit_id, a.site_id, a.kind);
      const work = CLOSURES[a.kind] ?? FALLBACK;
      const dispatched = opened + (5 + 15 * frac(a.id, 2)) * MIN;
      const acknowledged = dispatched + (8 + 30 * frac(a.id, 3)) * MIN;
      const onSite = Math.min(acknowledged + (40 + 180 * frac(a.id, 4)) * MIN, Math.max(acknowledged + 10 * MIN, cleared - 20 * MIN));
      const resolved = Math.max(cleared, onSite + 25 * MIN);
      if (resolved >= opts.now.getTime()) continue; // the fault is still being worked: the live rules take it from here
      const closed = resolved + DAY + 2 * HOUR * frac(a.id, 5);
      const isClosed = closed < opts.now.getTime();
      const evidence = typeof a.evidence === 'string' ? a.evidence : JSON.stringify(a.evidence ?? {});
      const steps = (from: string | null) => [
        ...(from
          ? [
              {
                from_state: from,
                to_state: 'reopened',
                at: new Date(opened),
                by_user: null,
                reason: `The fault came back: ${a.message}`.slice(0, 500),
              },
            ]
          : []),
        {
          from_state: from ? 'reopened' : 'new',
          to_state: 'dispatched',
          at: new Date(dispatched),
          by_user: dispatcher.id,
          assignee_id: crew,
        },
        { from_state: 'dispatched', to_state: 'acknowledged', at: new Date(acknowledged), by_user: crew },
        { from_state: 'acknowledged', to_state: 'on-site', at: new Date(onSite), by_user: crew },
        { from_state: 'on-site', to_state: 'resolved', at: new Date(resolved), by_user: crew, note: work.note },
        ...(isClosed ? [{ from_state: 'resolved', to_state: 'closed', at: new Date(closed), by_user: dispatcher.id }] : []),
      ];
      if (!lastOfFault.has(key)) {
        const prev = await trx('tickets')
          .where({ fault_key: key })
          .whereNotNull('resolved_at')
          .orderBy('id', 'desc')
          .first('id', 'resolved_at', 'state');
        if (prev && (prev.state === 'resolved' || prev.state === 'closed'))
          lastOfFault.set(key, { id: prev.id, resolvedAt: prev.resolved_at, closed: prev.state === 'closed' });
      }
      const last = lastOfFault.get(key);
      let ticketId: number;
      let transitions;
      if (last && opened - last.resolvedAt.getTime() <= REOPEN_WITHIN_MS) {
        ticketId = last.id;
        transitions = steps(last.closed ? 'closed' : 'resolved');
        await trx('tickets')
          .where({ id: ticketId })
          .update({
            state: isClosed ? 'closed' : 'resolved',
            version: trx.raw('version + ?', [transitions.length]),
            assignee_id: crew,
            acknowledged_at: new Date(acknowledged),
            on_site_at: new Date(onSite),
            resolved_at: new Date(resolved),
            closed_at: isClosed ? new Date(closed) : null,
          });
      } else {
        const sla = DEFAULT_SLA[severity];
        const due = (m: number) => new Date(opened + m * MIN);
        [ticketId] = (await trx('tickets').insert({
          site_id: a.site_id,
          unit_id: a.unit_id,
          kind: a.kind,
          severity,
          title: a.message.slice(0, 200),
          state: isClosed ? 'closed' : 'resolved',
          version: 6 + (isClosed ? 1 : 0),
          assignee_id: crew,
          fault_key: key,
          opened_at: new Date(opened),
          opened_by: null,
          acknowledge_due_at: due(sla.acknowledgeMin),
          on_site_due_at: due(sla.onSiteMin),
          fix_due_at: due(sla.fixMin),
          acknowledged_at: new Date(acknowledged),
          on_site_at: new Date(onSite),
          resolved_at: new Date(resolved),
          closed_at: isClosed ? new Date(closed) : null,
          closure: JSON.stringify({ ...work.closure, action: work.action }),
          availability_category: defaultCategoryOf(a.kind),
          parts: JSON.stringify(
            work.action === 'replace' || work.action === 'repair' ? [{ description: `${work.closure.component} part`, quantity: 1 }] : [],
          ),
        })) as [number];
        transitions = [
          { from_state: null, to_state: 'new', at: new Date(opened), by_user: null, reason: `Opened for alarm ${a.id}` },
          ...steps(null),
        ];
        made++;
      }
      await trx('ticket_transitions').insert(transitions.map((t) => ({ ticket_id: ticketId, ...t })));
      await trx('ticket_alarms').insert({ ticket_id: ticketId, alarm_id: a.id, evidence, linked_at: new Date(opened) });
      // Check-in held the unit (every unit of a site ticket) until check-out.
      const units: number[] = a.unit_id !== null ? [a.unit_id] : await trx('units').where({ site_id: a.site_id }).pluck('id');
      if (units.length)
        await trx('unit_holds').insert(
          units.map((u) => ({
            unit_id: u,
            holder_kind: 'ticket',
            holder_id: ticketId,
            note: 'Crew on site: motion commands are refused until check-out.',
            placed_at: new Date(onSite),
            placed_by: crew,
            released_at: new Date(resolved),
            released_by: crew,
            release_reason: `Ticket ${ticketId} resolved.`,
          })),
        );
      lastOfFault.set(key, { id: ticketId, resolvedAt: new Date(resolved), closed: isClosed });
    }
  });
  return made;
}
