import type { Logger } from 'pino';
import { ALARM_SEVERITIES, type AlarmSeverity, type AlarmView } from '../../shared/contracts/alarms';
import {
  DEFAULT_SLA,
  OPEN_TICKET_STATES,
  defaultCategoryOf,
  faultKeyOf,
  TICKET_TRANSITIONS,
  ruleFor,
  transitionsFor,
  type AvailabilityCategory,
  type SlaClockView,
  type SlaTargets,
  type TicketHoldStatus,
  type TicketClosure,
  type TicketPart,
  type TicketState,
  type TicketFileView,
  type TicketView,
  type WaitingReason,
} from '../../shared/contracts/tickets';
import { may } from '../../shared/contracts/permissions';
import { AppError, badRequest, conflict, forbidden, notFound } from '../errors/app-error';
import type { AlarmToLink, StoredTicket, TicketFilter, TicketPatch, TicketRepository, TransitionRecord } from '../data/ticket-repository';
import type { AdminService } from './admin-service';
import { scopeOf, type Caller } from './caller';
import { localDate, utcWindowOfLocalDate } from './local-time';
import { KPI_HELP, ticketKpis, type TicketKpis } from '../../shared/tickets/ticket-kpis';

/** `GET /api/owners/:id/sla`: the targets in force per severity, and which of them the owner's contract sets. */
export interface OwnerSla {
  ownerId: number;
  targets: Record<AlarmSeverity, SlaTargets>;
  contracted: AlarmSeverity[];
}

/** `GET /api/sites/:id/ticket-kpis?month=YYYY-MM`. */
export interface SiteTicketKpis extends TicketKpis {
  siteId: number;
  siteName: string;
  month: string;
  timeZone: string;
  help: typeof KPI_HELP;
}

function nextMonth(month: string): string {
  const [y, m] = month.split('-').map(Number) as [number, number];
  return m === 12 ? `${y + 1}-01` : `${y}-${String(m + 1).padStart(2, '0')}`;
}

/** What holds a ticket's units while its crew is on site (the command service). */
export interface TicketHolds {
  holdForTicket(by: Caller, unitId: number, ticketId: number, note: string): Promise<void>;
  releaseForTicket(by: Caller, unitId: number, ticketId: number, reason: string): Promise<void>;
}

export interface TicketOptions {
  /** A P3 alarm still open after this long opens a ticket [ms]. */
  p3DelayMs: number;
  /** A fault whose ticket was resolved or closed less than this long ago reopens it instead of opening another [ms]. */
  reopenWithinMs: number;
  now: () => number;
}

/** What happened to a ticket, told to listeners once it is stored (notifications). */
export interface TicketEvent {
  /** The ticket after the change, as the fleet sees it. */
  ticket: TicketView;
  /** null: the ticket was just opened. */
  from: TicketState | null;
  to: TicketState;
  /** Who made the change; null when an alarm did. */
  byUserId: number | null;
  /** The alarm that opened or reopened the ticket, if one did. */
  alarm?: { id: number; severity: string };
}

export type TicketListener = (e: TicketEvent) => void | Promise<void>;

/** The fleet-wide reader of tickets for listeners (they decide themselves who may hear what). */
const SYSTEM: Caller = { id: 0, role: 'admin', ownerId: null };

export const DEFAULT_TICKET_OPTIONS: TicketOptions = { p3DelayMs: 4 * 3600_000, reopenWithinMs: 7 * 86_400_000, now: Date.now };

export interface NewTicketRequest {
  unitId?: number;
  siteId?: number;
  title: string;
  severity: AlarmSeverity;
  description?: string;
}

export interface TransitionRequest {
  to: TicketState;
  version?: number;
  note?: string;
  reason?: string;
  assigneeId?: number;
  confirm?: boolean;
  closure?: TicketClosure;
  availabilityCategory?: AvailabilityCategory;
  parts?: TicketPart[];
}

/** Severities whose alarms open a ticket at once; P3 opens one after `p3DelayMs`; P4 goes to the daily digest. */
const AT_ONCE: readonly string[] = ['P1', 'P2'];

const CHECK_IN_NOTE = 'Crew on site: motion commands are refused until check-out.';

/**
 * Work orders: opened by hand or from alarms (one ticket per fault: a re-raised alarm within the reopen window reopens
 * its ticket), moved through the lifecycle table of shared/contracts/tickets.ts by the people it names, with an
 * optimistic lock (a stale write answers 409). Check-in places the ticket's hold on its unit (every unit of a site
 * ticket); check-out, cancel and close release it.
 */
export class TicketService {
  private timer: NodeJS.Timeout | undefined;
  private readonly opts: TicketOptions;
  /** Alarms being turned into tickets: one fault's alarms are handled one at a time. */
  private chain: Promise<unknown> = Promise.resolve();
  private readonly listeners = new Set<TicketListener>();
  private readonly told = new Set<Promise<void>>();

  constructor(
    private readonly repo: TicketRepository,
    private readonly admin: AdminService,
    private readonly holds: TicketHolds,
    private readonly log: Logger,
    opts: Partial<TicketOptions> = {},
    /** The ticket's photos and documents for its view (ticket-file-service.ts); none when omitted. */
    private readonly files?: { forTicket(ticketId: number): Promise<TicketFileView[]> },
  ) {
    this.opts = { ...DEFAULT_TICKET_OPTIONS, ...opts };
  }

  /** Sweeps for alarms that have stayed open long enough for the delayed rule, every minute. */
  start(intervalMs = 60_000): void {
    this.timer = setInterval(() => void this.sweep().catch((err) => this.log.error({ err }, 'ticket sweep failed')), intervalMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  async settle(): Promise<void> {
    await this.chain.catch(() => undefined);
    while (this.told.size) await Promise.all([...this.told]);
  }

  /** Tells `listener` of every ticket opened or moved, after the change is stored; returns the way to stop. */
  onEvent(listener: TicketListener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /** Listeners run after the change and apart from it: their failures are logged and never reach the caller. */
  private emit(id: number, from: TicketState | null, to: TicketState, byUserId: number | null, alarm?: TicketEvent['alarm']): void {
    if (!this.listeners.size) return;
    const run = (async () => {
      const ticket = await this.get(SYSTEM, id);
      for (const l of this.listeners) await l({ ticket, from, to, byUserId, ...(alarm ? { alarm } : {}) });
    })()
      .catch((err) => this.log.error({ err, ticketId: id }, 'ticket listener failed'))
      .finally(() => this.told.delete(run));
    this.told.add(run);
  }

  // ---- reads

  async list(c: Caller, f: TicketFilter): Promise<TicketView[]> {
    if (f.siteId !== undefined) await this.admin.getSite(c, f.siteId);
    if (f.unitId !== undefined) await this.admin.getUnit(c, f.unitId);
    return (await this.repo.list(scopeOf(c), f)).map((t) => this.view(c, t));
  }

  async get(c: Caller, id: number): Promise<TicketView> {
    const t = await this.stored(c, id);
    await this.estimateLostEnergy(t);
    const [transitions, alarms, holds, health, files] = await Promise.all([
      this.repo.transitions(id),
      this.repo.alarms(id),
      this.repo.holdsInForce(id),
      this.repo.faultHealth(t),
      this.files?.forTicket(id) ?? Promise.resolve([]),
    ]);
    return {
      ...this.view(c, t),
      transitions,
      alarms,
      files,
      holds: holds.map((h) => ({ unitId: h.unitId, serial: h.serial, status: holdStatus(h.commandStatus, h.commandReason) })),
      health: {
        activeAlarms: health.activeAlarms,
        clearSince: health.activeAlarms ? null : ((health.lastClearedAt ?? t.resolvedAt)?.toISOString() ?? null),
      },
    };
  }

  /** Work-order KPIs of a site for a calendar month in the site's time zone (tickets opened in that month). */
  async kpis(c: Caller, siteId: number, month: string): Promise<SiteTicketKpis> {
    const site = await this.admin.getSite(c, siteId);
    const first = `${month}-01`;
    const { from } = utcWindowOfLocalDate(first);
    const next = nextMonth(month);
    const { to } = utcWindowOfLocalDate(`${next}-01`);
    const rows = (await this.repo.forKpis(site.id, from, to)).filter((t) =>
      localDate(t.openedAt.getTime(), site.timeZone).startsWith(month),
    );
    const ms = (d: Date | null) => (d ? d.getTime() : null);
    const kpis = ticketKpis(
      rows.map((t) => ({
        id: t.id,
        faultKey: t.faultKey,
        openedAtMs: t.openedAt.getTime(),
        acknowledgedAtMs: ms(t.acknowledgedAt),
        onSiteAtMs: ms(t.onSiteAt),
        resolvedAtMs: ms(t.resolvedAt),
        state: t.state,
        clocks:
          t.state === 'cancelled'
            ? []
            : [
                { dueAtMs: t.acknowledgeDueAt.getTime(), metAtMs: ms(t.acknowledgedAt) },
                { dueAtMs: t.onSiteDueAt.getTime(), metAtMs: ms(t.onSiteAt) },
                { dueAtMs: t.fixDueAt.getTime(), metAtMs: ms(t.resolvedAt) },
              ],
        visits: t.visits,
        repeated: t.repeated,
      })),
      this.opts.now(),
    );
    return { siteId: site.id, siteName: site.name, month, timeZone: site.timeZone, ...kpis, help: KPI_HELP };
  }

  /** The crew members a ticket can be dispatched to. */
  assignees(): Promise<{ id: number; name: string }[]> {
    return this.repo.activeCrew();
  }

  /**
   * The ticket's lost-energy estimate: while it is open, from its alarms' open intervals so far; once resolved, stored
   * (a finished ticket's figure no longer changes).
   */
  private async estimateLostEnergy(t: StoredTicket): Promise<void> {
    if (t.unitId === null) return;
    const done = t.state === 'resolved' || t.state === 'closed' || t.state === 'cancelled';
    if (done && t.lostEnergyKwh !== null) return;
    const kwh = await this.repo.peerShortfallKwh(t.id, t.unitId, t.siteId, this.opts.now());
    t.lostEnergyKwh = kwh;
    if (done && kwh !== null) await this.repo.setLostEnergy(t.id, kwh);
  }

  // ---- opening

  /** A ticket by hand, for a unit or a whole site. */
  async create(c: Caller, req: NewTicketRequest): Promise<TicketView> {
    if (!may(c.role, 'openTickets')) throw forbidden('Only technicians, engineers and admins open tickets.');
    if ((req.unitId === undefined) === (req.siteId === undefined))
      throw badRequest('A ticket is for one unit or one site: give unitId or siteId, not both.', {
        unitId: 'Give this or siteId.',
        siteId: 'Give this or unitId.',
      });
    const unit = req.unitId !== undefined ? await this.admin.getUnit(c, req.unitId) : null;
    const siteId = unit ? unit.siteId : (await this.admin.getSite(c, req.siteId!)).id;
    const now = new Date(this.opts.now());
    const id = await this.repo.insert(
      {
        siteId,
        unitId: unit?.id ?? null,
        kind: 'manual',
        severity: req.severity,
        title: req.title.trim(),
        description: req.description?.trim() || null,
        faultKey: null,
        openedAt: now,
        openedBy: c.id,
        ...(await this.dueTimes(siteId, req.severity, now)),
        availabilityCategory: 'forced-outage',
      },
      { from: null, to: 'new', at: now, by: c.id, note: null, reason: null, assigneeId: null },
      null,
      { userId: c.id, action: 'ticket-open', detail: { unitId: unit?.id ?? null, siteId, severity: req.severity } },
    );
    this.emit(id, null, 'new', c.id);
    return this.get(c, id);
  }

  /** The hook on raised alarms: P1/P2 open (or reopen) a ticket at once; the rest wait for the sweep or the digest. */
  onAlarmRaised(a: AlarmView): Promise<void> {
    if (!AT_ONCE.includes(a.severity)) return Promise.resolve();
    return this.serialize(() => this.ticketForAlarm(a));
  }

  /** Opens tickets for P3 alarms that have stayed open past the delay. */
  async sweep(): Promise<number> {
    const before = new Date(this.opts.now() - this.opts.p3DelayMs);
    const due = await this.repo.unticketedActiveAlarms('P3', before);
    for (const a of due)
      await this.serialize(() =>
        this.ticketForAlarm({
          id: a.id,
          unitId: a.unitId,
          siteId: a.siteId,
          kind: a.kind,
          severity: a.severity,
          message: a.message,
          evidence: a.evidence,
          serial: a.serial,
          raisedAt: a.raisedAt.toISOString(),
        }),
      );
    return due.length;
  }

  /** One fault's alarms one at a time; `rethrow` for a person's request (the rules' failures are only logged). */
  private serialize(fn: () => Promise<unknown>, rethrow = false): Promise<void> {
    const next = this.chain.catch(() => undefined).then(fn);
    this.chain = next;
    return next.then(
      () => undefined,
      (err: unknown) => {
        if (rethrow) throw err;
        this.log.error({ err }, 'ticket for an alarm failed');
      },
    );
  }

  /**
   * The ticket of an alarm's fault: the open one (the alarm is linked to it), the one resolved or closed within the
   * reopen window (reopened), or a new one. `by` is the person who asked; null when an alarm rule did. Returns its id.
   */
  private async ticketForAlarm(
    a: Pick<AlarmView, 'id' | 'unitId' | 'serial' | 'siteId' | 'kind' | 'severity' | 'message' | 'evidence' | 'raisedAt'>,
    by: number | null = null,
  ): Promise<number> {
    const now = new Date(this.opts.now());
    const key = faultKeyOf(a.unitId, a.siteId, a.kind);
    const link: AlarmToLink = { alarmId: a.id, evidence: a.evidence, linkedAt: now };
    const last = await this.repo.latestForFault(key);
    if (last && OPEN_TICKET_STATES.includes(last.state)) {
      await this.repo.linkAlarm(last.id, link);
      return last.id;
    }
    const doneAt = last && (last.closedAt ?? last.resolvedAt);
    if (
      last &&
      (last.state === 'resolved' || last.state === 'closed') &&
      doneAt &&
      now.getTime() - doneAt.getTime() <= this.opts.reopenWithinMs
    ) {
      const ok = await this.repo.transition(
        last.id,
        last.version,
        { state: 'reopened' },
        { from: last.state, to: 'reopened', at: now, by, note: null, reason: `The fault came back: ${a.message}`, assigneeId: null },
        { userId: by, action: 'ticket-reopen', target: `ticket:${last.id}`, detail: { alarmId: a.id, automatic: by === null } },
        link,
      );
      if (ok) {
        this.emit(last.id, last.state, 'reopened', by, { id: a.id, severity: a.severity });
        return last.id;
      }
    }
    const severity = (ALARM_SEVERITIES as readonly string[]).includes(a.severity) ? (a.severity as AlarmSeverity) : 'P3';
    const id = await this.repo.insert(
      {
        siteId: a.siteId,
        unitId: a.unitId,
        kind: a.kind,
        severity,
        title: `${a.serial ?? 'Site'}: ${a.message}`.slice(0, 200),
        description: null,
        faultKey: key,
        openedAt: now,
        openedBy: by,
        ...(await this.dueTimes(a.siteId, severity, now)),
        availabilityCategory: defaultCategoryOf(a.kind),
      },
      { from: null, to: 'new', at: now, by, note: null, reason: `Opened for alarm ${a.id}`, assigneeId: null },
      link,
      { userId: by, action: 'ticket-open', detail: { alarmId: a.id, automatic: by === null, severity } },
    );
    this.emit(id, null, 'new', by, { id: a.id, severity });
    return id;
  }

  /** A technician's one step from an alarm card: the ticket of the alarm's fault (found, reopened or opened). */
  async forAlarm(c: Caller, alarm: AlarmView): Promise<TicketView> {
    if (!may(c.role, 'openTickets')) throw forbidden('Only technicians, engineers and admins open tickets.');
    let id = 0;
    await this.serialize(async () => {
      id = await this.ticketForAlarm(alarm, c.id);
    }, true);
    return this.get(c, id);
  }

  // ---- the lifecycle

  async transition(c: Caller, id: number, req: TransitionRequest): Promise<TicketView> {
    const t = await this.stored(c, id);
    const isAssignee = t.assignee?.id === c.id;
    const rule = ruleFor(t.state, req.to);
    const mine = transitionsFor(t.state, c.role, isAssignee);
    if (!rule) {
      const allowed = [...new Set(TICKET_TRANSITIONS.filter((r) => r.from.includes(t.state)).map((r) => r.to))];
      throw new AppError(
        409,
        'transition_not_allowed',
        `A ${t.state} ticket cannot become ${req.to}. Allowed next: ${allowed.join(', ') || 'none'}.`,
        { to: `Allowed next: ${allowed.join(', ') || 'none'}.` },
      );
    }
    if (!mine.includes(rule)) {
      throw forbidden(
        rule.by.includes('assignee') && rule.by.length === 1
          ? `Only the crew member this ticket is assigned to (${t.assignee?.name ?? 'nobody yet'}) may make it ${req.to}.`
          : `Your role may not make this ticket ${req.to}.`,
      );
    }
    if (req.version !== undefined && req.version !== t.version) throw this.stale(t);
    const now = new Date(this.opts.now());
    const patch: TicketPatch = { state: req.to };
    const fields: Record<string, string> = {};
    const note = req.note?.trim() || null;
    const reason = req.reason?.trim() || null;
    for (const need of rule.needs) {
      if ((need === 'assigneeId' || need === 'newAssignee') && req.assigneeId === undefined)
        fields['assigneeId'] = 'Required: the crew member to send.';
      if (need === 'newAssignee' && req.assigneeId !== undefined && req.assigneeId === t.assignee?.id)
        fields['assigneeId'] = `Already assigned to ${t.assignee.name}: name someone else to re-assign.`;
      if (need === 'confirm' && req.confirm !== true)
        fields['confirm'] =
          req.to === 'on-site'
            ? 'Must be true: confirm the cautions (moving parts, stored energy, DC live in daylight, wind limit; a software hold is not lockout/tagout).'
            : 'Must be true: confirm the unit may move again when the ticket lets go of it.';
      if (need === 'closure' && !req.closure) fields['closure'] = 'Required: component, failure mode, cause and action.';
      if (need === 'note' && !note) fields['note'] = 'Required: what was done.';
      if (need === 'reason' && !reason) fields['reason'] = 'Required: say why.';
      if (need === 'waitingReason' && !isWaitingReason(req.reason))
        fields['reason'] = 'Required: one of parts, access, weather, warranty, owner.';
    }
    if (Object.keys(fields).length) throw badRequest(`The move to ${req.to} needs more: ${Object.keys(fields).join(', ')}.`, fields);
    if (req.assigneeId !== undefined) {
      // Dispatching may always name the crew (back from waiting, too); other moves keep the assignee.
      if (req.to !== 'dispatched')
        throw badRequest(`assigneeId does not belong to a move to ${req.to}.`, { assigneeId: 'Only when dispatching.' });
      if (!(await this.repo.isActiveCrew(req.assigneeId)))
        throw badRequest('Tickets are assigned to active field crew members.', { assigneeId: 'Not an active field crew member.' });
      patch.assigneeId = req.assigneeId;
    }
    switch (req.to) {
      case 'acknowledged':
        if (t.state === 'dispatched') patch.acknowledgedAt = t.acknowledgedAt ?? now;
        break;
      case 'on-site':
        patch.onSiteAt = t.onSiteAt ?? now;
        break;
      case 'waiting':
        patch.waitingReason = req.reason as WaitingReason;
        break;
      case 'resolved':
        patch.resolvedAt = now;
        patch.closure = req.closure!;
        break;
      case 'closed':
        patch.closedAt = now;
        break;
      case 'cancelled':
        patch.cancelledAt = now;
        break;
      case 'reopened':
        patch.resolvedAt = null;
        patch.closedAt = null;
        break;
    }
    if (req.to !== 'waiting' && t.waitingReason) patch.waitingReason = null;
    if (req.availabilityCategory) patch.availabilityCategory = req.availabilityCategory;
    if (req.parts) patch.parts = [...t.parts, ...req.parts];

    const unitIds = t.unitId !== null ? [t.unitId] : await this.repo.siteUnitIds(t.siteId);
    // Check-in: the hold is in force before the ticket says "on site"; a lost race gives it back.
    if (rule.hold === 'place') for (const u of unitIds) await this.holds.holdForTicket(c, u, t.id, CHECK_IN_NOTE);
    const record: TransitionRecord = {
      from: t.state,
      to: req.to,
      at: now,
      by: c.id,
      note,
      reason,
      assigneeId: patch.assigneeId ?? null,
    };
    const ok = await this.repo.transition(t.id, t.version, patch, record, {
      userId: c.id,
      action: 'ticket-transition',
      target: `ticket:${t.id}`,
      detail: { from: t.state, to: req.to, assigneeId: patch.assigneeId ?? null, reason },
    });
    if (!ok) {
      // Give the hold back unless the ticket is on site after all (a concurrent check-in of the same ticket won).
      if (rule.hold === 'place' && (await this.repo.get(t.id, { ownerId: null }))?.state !== 'on-site')
        await this.releaseHolds(c, t.id, unitIds, 'Check-in did not go through: the ticket had changed.');
      throw this.stale(t);
    }
    if (rule.hold === 'release')
      await this.releaseHolds(c, t.id, unitIds, `Ticket ${t.id} ${req.to === 'waiting' ? 'checked out (waiting)' : req.to}.`);
    this.emit(t.id, t.state, req.to, c.id);
    return this.get(c, t.id);
  }

  private async releaseHolds(c: Caller, ticketId: number, unitIds: number[], reason: string): Promise<void> {
    for (const u of unitIds) {
      await this.holds
        .releaseForTicket(c, u, ticketId, reason)
        .catch((err) => this.log.error({ err, ticketId, unitId: u }, "ticket's hold not released; an admin can release it"));
    }
  }

  private stale(t: StoredTicket): AppError {
    return conflict(`Ticket ${t.id} was changed by someone else (now ${t.state}, version ${t.version}): reload it and try again.`, {
      version: 'Stale: reload the ticket.',
    });
  }

  private async stored(c: Caller, id: number): Promise<StoredTicket> {
    const t = await this.repo.get(id, scopeOf(c));
    if (!t) throw notFound('Ticket');
    return t;
  }

  /** The SLA targets of a site's owner: its contracted ones where set, else the defaults. */
  async slaOf(c: Caller, ownerId: number): Promise<OwnerSla> {
    await this.admin.getOwner(c, ownerId);
    const own = await this.repo.ownerSla(ownerId);
    return {
      ownerId,
      targets: Object.fromEntries(ALARM_SEVERITIES.map((s) => [s, own[s] ?? DEFAULT_SLA[s]])) as Record<AlarmSeverity, SlaTargets>,
      contracted: ALARM_SEVERITIES.filter((s) => own[s] !== undefined),
    };
  }

  /** Admins set an owner's contracted targets; tickets opened from now on use them (open tickets keep their due times). */
  async setSla(c: Caller, ownerId: number, targets: Partial<Record<AlarmSeverity, SlaTargets>>): Promise<OwnerSla> {
    await this.admin.getOwner(c, ownerId);
    for (const [sev, t] of Object.entries(targets)) {
      if (!(t.acknowledgeMin <= t.onSiteMin && t.onSiteMin <= t.fixMin))
        throw badRequest(`The ${sev} targets must not shrink along the way: acknowledge ≤ on site ≤ fixed.`, {
          [sev]: 'acknowledgeMin ≤ onSiteMin ≤ fixMin',
        });
    }
    await this.repo.replaceOwnerSla(ownerId, targets, { userId: c.id, action: 'sla-update', target: `owner:${ownerId}`, detail: targets });
    return this.slaOf(c, ownerId);
  }

  private async dueTimes(siteId: number, severity: AlarmSeverity, openedAt: Date) {
    const ownerId = await this.repo.ownerOfSite(siteId);
    const sla = (ownerId !== undefined ? (await this.repo.ownerSla(ownerId))[severity] : undefined) ?? DEFAULT_SLA[severity];
    const at = (min: number) => new Date(openedAt.getTime() + min * 60_000);
    return { acknowledgeDueAt: at(sla.acknowledgeMin), onSiteDueAt: at(sla.onSiteMin), fixDueAt: at(sla.fixMin) };
  }

  private view(c: Caller, t: StoredTicket): TicketView {
    const iso = (d: Date | null) => (d ? d.toISOString() : null);
    const now = this.opts.now();
    const stopped = t.state === 'cancelled';
    const clock = (name: SlaClockView['name'], due: Date, met: Date | null): SlaClockView => ({
      name,
      dueAt: due.toISOString(),
      metAt: iso(met),
      status: met
        ? met.getTime() <= due.getTime()
          ? 'met'
          : 'breached'
        : now > due.getTime()
          ? 'breached'
          : stopped
            ? 'stopped'
            : 'running',
    });
    return {
      id: t.id,
      state: t.state,
      version: t.version,
      siteId: t.siteId,
      siteName: t.siteName,
      unitId: t.unitId,
      serial: t.serial,
      kind: t.kind,
      severity: t.severity,
      title: t.title,
      description: t.description,
      assignee: t.assignee,
      openedAt: t.openedAt.toISOString(),
      openedBy: t.openedBy,
      acknowledgedAt: iso(t.acknowledgedAt),
      onSiteAt: iso(t.onSiteAt),
      resolvedAt: iso(t.resolvedAt),
      closedAt: iso(t.closedAt),
      cancelledAt: iso(t.cancelledAt),
      waitingReason: t.waitingReason,
      closure: t.closure,
      availabilityCategory: t.availabilityCategory,
      lostEnergyKwh: t.lostEnergyKwh,
      parts: t.parts,
      clocks: [
        clock('acknowledge', t.acknowledgeDueAt, t.acknowledgedAt),
        clock('onSite', t.onSiteDueAt, t.onSiteAt),
        clock('fix', t.fixDueAt, t.resolvedAt),
      ],
      next: [...new Set(transitionsFor(t.state, c.role, t.assignee?.id === c.id).map((r) => r.to))],
    };
  }
}

function holdStatus(status: string | null, reason: string | null): TicketHoldStatus {
  if (status === 'completed') return reason?.startsWith('Added to the hold') ? 'joined' : 'confirmed';
  if (status === 'rejected' || status === 'timed-out' || status === 'cancelled') return 'not-confirmed';
  return 'waiting';
}

const isWaitingReason = (r: string | undefined): r is WaitingReason =>
  r === 'parts' || r === 'access' || r === 'weather' || r === 'warranty' || r === 'owner';
