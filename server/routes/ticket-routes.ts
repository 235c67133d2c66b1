import { Router } from 'express';
import { z } from 'zod';
import { ALARM_SEVERITIES } from '../../shared/contracts/alarms';
import {
  AVAILABILITY_CATEGORIES,
  CLOSURE_ACTIONS,
  ROOT_CAUSE_CLASSES,
  TICKET_STATES,
  type TicketState,
} from '../../shared/contracts/tickets';
import type { AlarmService } from '../services/alarm-service';
import type { AuditService } from '../services/audit-service';
import type { TicketService } from '../services/ticket-service';
import { ticketLogCsv } from '../services/ticket-csv';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const positiveId = z.coerce.number().int().positive('Must be a positive whole number.');
const text = (max: number) => z.string().trim().min(1, 'Must not be empty.').max(max, `At most ${max} characters.`);

const listQuery = z.strictObject({
  state: z.enum(TICKET_STATES, `Must be one of ${TICKET_STATES.join(', ')}.`).optional(),
  siteId: positiveId.optional(),
  unitId: positiveId.optional(),
  assignee: z.literal('me', 'Only "me" is supported.').optional(),
  limit: z.coerce.number().int().min(1, 'Must be between 1 and 1000.').max(1000, 'Must be between 1 and 1000.').optional(),
});

const kpiQuery = z.strictObject({
  month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'Must be a calendar month such as 2026-11.'),
});

const minutes = z
  .number()
  .int('Whole minutes.')
  .min(1, 'At least 1 minute.')
  .max(365 * 24 * 60, 'At most a year.');
const slaTargets = z.strictObject({ acknowledgeMin: minutes, onSiteMin: minutes, fixMin: minutes });
const slaBody = z.strictObject({
  P1: slaTargets.optional(),
  P2: slaTargets.optional(),
  P3: slaTargets.optional(),
  P4: slaTargets.optional(),
});

const fromAlarmBody = z.strictObject({ alarmId: z.number().int().positive('Must be a positive whole number.') });

const createBody = z.strictObject({
  unitId: z.number().int().positive().optional(),
  siteId: z.number().int().positive().optional(),
  title: text(200),
  severity: z.enum(ALARM_SEVERITIES, 'Must be P1, P2, P3 or P4.'),
  description: z.string().max(4000, 'At most 4000 characters.').optional(),
});

const transitionBody = z.strictObject({
  to: z.enum(TICKET_STATES, `Must be one of ${TICKET_STATES.join(', ')}.`),
  version: z.number().int().positive().optional(),
  note: z.string().max(2000, 'At most 2000 characters.').optional(),
  reason: z.string().max(500, 'At most 500 characters.').optional(),
  assigneeId: z.number().int().positive().optional(),
  confirm: z.boolean().optional(),
  closure: z
    .strictObject({
      component: text(120),
      failureMode: text(120),
      cause: text(200),
      action: z.enum(CLOSURE_ACTIONS, `Must be one of ${CLOSURE_ACTIONS.join(', ')}.`),
      rootCauseClass: z.enum(ROOT_CAUSE_CLASSES, `Must be one of ${ROOT_CAUSE_CLASSES.join(', ')}.`).optional(),
    })
    .optional(),
  availabilityCategory: z.enum(AVAILABILITY_CATEGORIES, `Must be one of ${AVAILABILITY_CATEGORIES.join(', ')}.`).optional(),
  parts: z
    .array(z.strictObject({ description: text(200), quantity: z.number().positive('Must be more than 0.').max(10_000) }))
    .max(50)
    .optional(),
});

/**
 * Work orders. Mounted behind requireSession; owners read their own sites' tickets only (404 otherwise).
 *   GET  /tickets?state&siteId&unitId&assignee=me&limit   open first by fix due time
 *   GET  /tickets.csv                                     the ticket log with every state time (RFC 4180, UTC)
 *   POST /tickets { unitId | siteId, title, severity, description? }       technician, engineer, admin → 201
 *   POST /tickets { alarmId }                             the ticket of the alarm's fault: found, reopened or opened → 201
 *   GET  /tickets/assignees                               technician, engineer, admin: the crew members to dispatch to
 *   GET  /tickets/:id                                     with transitions, linked alarms, SLA clocks, next moves
 *   GET  /sites/:id/ticket-kpis?month=YYYY-MM             acknowledgement … repeat repairs, in the site's calendar
 *   GET  /owners/:id/sla                                  targets per severity (the contract's, else the defaults)
 *   PUT  /owners/:id/sla { P1?: { acknowledgeMin, onSiteMin, fixMin }, … }   admin: severities left out use the defaults
 *   POST /tickets/:id/transition { to, version?, note?, reason?, assigneeId?, confirm?, closure?, … }
 */
export function ticketRoutes(tickets: TicketService, alarms: AlarmService, audit: AuditService): Router {
  const r = Router();

  r.get('/tickets', async (req, res) => {
    const c = callerOf(req);
    const { assignee, state, ...q } = parse(listQuery, req.query);
    res.json(await tickets.list(c, { ...q, ...(state ? { state: state as TicketState } : {}), ...(assignee ? { assigneeId: c.id } : {}) }));
  });

  r.get('/tickets.csv', async (req, res) => {
    const c = callerOf(req);
    const { assignee, state, ...q } = parse(listQuery, req.query);
    const list = await tickets.list(c, {
      ...q,
      ...(state ? { state: state as TicketState } : {}),
      ...(assignee ? { assigneeId: c.id } : {}),
    });
    await audit.record(c, 'ticket-export', null, { rows: list.length, ...req.query });
    res.setHeader('Content-Type', 'text/csv; charset=utf-8; header=present');
    res.setHeader('Content-Disposition', 'attachment; filename="tickets.csv"');
    res.send(ticketLogCsv(list));
  });

  r.get('/tickets/assignees', requireRole('openTickets'), async (_req, res) => {
    res.json(await tickets.assignees());
  });

  r.post('/tickets', requireRole('openTickets'), async (req, res) => {
    const c = callerOf(req);
    if (req.body && typeof req.body === 'object' && 'alarmId' in req.body) {
      const alarm = await alarms.get(c, parse(fromAlarmBody, req.body, 'The ticket').alarmId);
      res.status(201).json(await tickets.forAlarm(c, alarm));
      return;
    }
    res.status(201).json(await tickets.create(c, parse(createBody, req.body, 'The ticket')));
  });

  r.get('/tickets/:id', async (req, res) => {
    res.json(await tickets.get(callerOf(req), parse(idParam, req.params).id));
  });

  r.get('/sites/:id/ticket-kpis', async (req, res) => {
    const { month } = parse(kpiQuery, req.query);
    res.json(await tickets.kpis(callerOf(req), parse(idParam, req.params).id, month));
  });

  r.get('/owners/:id/sla', async (req, res) => {
    res.json(await tickets.slaOf(callerOf(req), parse(idParam, req.params).id));
  });

  r.put('/owners/:id/sla', requireRole('administer'), async (req, res) => {
    res.json(await tickets.setSla(callerOf(req), parse(idParam, req.params).id, parse(slaBody, req.body, 'The SLA targets')));
  });

  r.post('/tickets/:id/transition', requireRole('moveTickets'), async (req, res) => {
    const id = parse(idParam, req.params).id;
    res.json(await tickets.transition(callerOf(req), id, parse(transitionBody, req.body, 'The transition')));
  });
  return r;
}
