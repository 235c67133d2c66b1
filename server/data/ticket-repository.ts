import type { Knex } from 'knex';
import type { AlarmSeverity } from '../../shared/contracts/alarms';
import type {
  AvailabilityCategory,
  SlaTargets,
  TicketAlarmLink,
  TicketClosure,
  TicketPart,
  TicketState,
  TicketTransitionView,
  WaitingReason,
} from '../../shared/contracts/tickets';
import type { Db } from './db';
import type { SiteScope } from './site-repository';
import { appendAudit, type AuditEntry } from './audit-repository';

/** A ticket as stored, with the names the views show. Times are Dates; the service builds the API view. */
export interface StoredTicket {
  id: number;
  siteId: number;
  siteName: string;
  ownerId: number;
  unitId: number | null;
  serial: string | null;
  kind: string;
  severity: AlarmSeverity;
  title: string;
  description: string | null;
  state: TicketState;
  version: number;
  assignee: { id: number; name: string } | null;
  faultKey: string | null;
  openedAt: Date;
  openedBy: { id: number; name: string } | null;
  acknowledgeDueAt: Date;
  onSiteDueAt: Date;
  fixDueAt: Date;
  acknowledgedAt: Date | null;
  onSiteAt: Date | null;
  resolvedAt: Date | null;
  closedAt: Date | null;
  cancelledAt: Date | null;
  waitingReason: WaitingReason | null;
  closure: TicketClosure | null;
  availabilityCategory: AvailabilityCategory;
  lostEnergyKwh: number | null;
  parts: TicketPart[];
}

export interface NewTicket {
  siteId: number;
  unitId: number | null;
  kind: string;
  severity: AlarmSeverity;
  title: string;
  description: string | null;
  faultKey: string | null;
  openedAt: Date;
  openedBy: number | null;
  acknowledgeDueAt: Date;
  onSiteDueAt: Date;
  fixDueAt: Date;
  availabilityCategory: AvailabilityCategory;
}

/** The columns a transition may change. */
export interface TicketPatch {
  state: TicketState;
  assigneeId?: number | null;
  acknowledgedAt?: Date | null;
  onSiteAt?: Date | null;
  resolvedAt?: Date | null;
  closedAt?: Date | null;
  cancelledAt?: Date | null;
  waitingReason?: WaitingReason | null;
  closure?: TicketClosure | null;
  availabilityCategory?: AvailabilityCategory;
  parts?: TicketPart[];
}

export interface TransitionRecord {
  from: TicketState | null;
  to: TicketState;
  at: Date;
  by: number | null;
  note: string | null;
  reason: string | null;
  assigneeId: number | null;
}

export interface AlarmToLink {
  alarmId: number;
  evidence: Record<string, unknown>;
  linkedAt: Date;
}

export interface TicketFilter {
  state?: TicketState;
  siteId?: number;
  unitId?: number;
  assigneeId?: number;
  limit?: number;
}

/** An alarm old enough for its severity's delayed rule that no ticket links yet. */
export interface UnticketedAlarm {
  id: number;
  unitId: number | null;
  serial: string | null;
  siteId: number;
  kind: string;
  severity: string;
  message: string;
  evidence: Record<string, unknown>;
  raisedAt: Date;
}

const json = <T>(v: unknown): T => (typeof v === 'string' ? (JSON.parse(v) as T) : (v as T));

/** Tickets, their transitions and their linked alarms. Owner scoping joins through the site. */
export class TicketRepository {
  constructor(private readonly db: Db) {}

  /** Stores a new ticket with its opening transition (and the alarm it was opened for) in one transaction. */
  async insert(t: NewTicket, opening: TransitionRecord, alarm: AlarmToLink | null, audit: AuditEntry | null): Promise<number> {
    return this.db.transaction(async (trx) => {
      const [id] = await trx('tickets').insert({
        site_id: t.siteId,
        unit_id: t.unitId,
        kind: t.kind,
        severity: t.severity,
        title: t.title,
        description: t.description,
        state: 'new',
        version: 1,
        fault_key: t.faultKey,
        opened_at: t.openedAt,
        opened_by: t.openedBy,
        acknowledge_due_at: t.acknowledgeDueAt,
        on_site_due_at: t.onSiteDueAt,
        fix_due_at: t.fixDueAt,
        availability_category: t.availabilityCategory,
        parts: '[]',
      });
      await insertTransition(trx, id!, opening);
      if (alarm) await linkAlarm(trx, id!, alarm);
      if (audit) await appendAudit(trx, { ...audit, target: `ticket:${id}` });
      return id!;
    });
  }

  /**
   * Applies a transition if the ticket is still at `version` (and in `from`): the new state, the transition row, an
   * alarm link and the audit entry in one transaction. False when someone else changed the ticket first.
   */
  async transition(
    id: number,
    version: number,
    patch: TicketPatch,
    record: TransitionRecord,
    audit: AuditEntry | null,
    alarm: AlarmToLink | null = null,
  ): Promise<boolean> {
    return this.db.transaction(async (trx) => {
      const n = await trx('tickets')
        .where({ id, version, state: record.from })
        .update({ ...rowOfPatch(patch), version: version + 1 });
      if (n !== 1) return false;
      await insertTransition(trx, id, record);
      if (alarm) await linkAlarm(trx, id, alarm);
      if (audit) await appendAudit(trx, audit);
      return true;
    });
  }

  /** Links an alarm to a ticket (nothing when it is linked already). */
  async linkAlarm(ticketId: number, alarm: AlarmToLink): Promise<void> {
    await this.db.transaction((trx) => linkAlarm(trx, ticketId, alarm));
  }

  async get(id: number, scope: SiteScope): Promise<StoredTicket | undefined> {
    const r = await this.base(scope).where('t.id', id).first();
    return r ? toTicket(r) : undefined;
  }

  /** Open tickets first by fix due time, then the rest newest first. */
  async list(scope: SiteScope, f: TicketFilter): Promise<StoredTicket[]> {
    const q = this.base(scope);
    if (f.state) q.where('t.state', f.state);
    if (f.siteId !== undefined) q.where('t.site_id', f.siteId);
    if (f.unitId !== undefined) q.where('t.unit_id', f.unitId);
    if (f.assigneeId !== undefined) q.where('t.assignee_id', f.assigneeId);
    q.orderByRaw("t.state IN ('closed', 'cancelled', 'resolved'), t.fix_due_at, t.id DESC").limit(f.limit ?? 500);
    return (await q).map(toTicket);
  }

  /** The latest ticket of a fault (unit or site + alarm kind), if any. */
  async latestForFault(faultKey: string): Promise<StoredTicket | undefined> {
    const r = await this.base({ ownerId: null }).where('t.fault_key', faultKey).orderBy('t.id', 'desc').first();
    return r ? toTicket(r) : undefined;
  }

  async transitions(id: number): Promise<TicketTransitionView[]> {
    const rows = await this.db('ticket_transitions as tt')
      .leftJoin('users as b', 'b.id', 'tt.by_user')
      .leftJoin('users as a', 'a.id', 'tt.assignee_id')
      .where('tt.ticket_id', id)
      .orderBy('tt.id')
      .select('tt.*', 'b.name as by_name', 'a.name as assignee_name');
    return rows.map((r) => ({
      from: r.from_state,
      to: r.to_state,
      at: (r.at as Date).toISOString(),
      by: r.by_user !== null ? { id: r.by_user, name: r.by_name } : null,
      note: r.note,
      reason: r.reason,
      assignee: r.assignee_id !== null ? { id: r.assignee_id, name: r.assignee_name } : null,
    }));
  }

  async alarms(id: number): Promise<TicketAlarmLink[]> {
    const rows = await this.db('ticket_alarms as ta')
      .join('alarms as al', 'al.id', 'ta.alarm_id')
      .where('ta.ticket_id', id)
      .orderBy('ta.linked_at')
      .select('ta.alarm_id', 'ta.evidence', 'al.kind', 'al.severity', 'al.message', 'al.raised_at');
    return rows.map((r) => ({
      alarmId: r.alarm_id,
      kind: r.kind,
      severity: r.severity,
      message: r.message,
      raisedAt: (r.raised_at as Date).toISOString(),
      evidence: json<Record<string, unknown>>(r.evidence),
    }));
  }

  /** Active alarms of a severity raised before `before` that no ticket links (the delayed rule's candidates). */
  async unticketedActiveAlarms(severity: string, before: Date): Promise<UnticketedAlarm[]> {
    const rows = await this.db('alarms as al')
      .leftJoin('ticket_alarms as ta', 'ta.alarm_id', 'al.id')
      .leftJoin('units as u', 'u.id', 'al.unit_id')
      .whereNull('ta.alarm_id')
      .where({ 'al.state': 'active', 'al.severity': severity })
      .where('al.raised_at', '<=', before)
      .orderBy('al.id')
      .select('al.id', 'al.unit_id', 'u.serial', 'al.site_id', 'al.kind', 'al.severity', 'al.message', 'al.evidence', 'al.raised_at');
    return rows.map((r) => ({
      id: r.id,
      unitId: r.unit_id,
      serial: r.serial ?? null,
      siteId: r.site_id,
      kind: r.kind,
      severity: r.severity,
      message: r.message,
      evidence: json<Record<string, unknown>>(r.evidence),
      raisedAt: r.raised_at,
    }));
  }

  /**
   * A site's tickets opened in [from, to), with their check-in count and whether their fault came back within 90 days
   * of the resolution (a later ticket of the same fault, or a reopening), for the KPIs.
   */
  async forKpis(siteId: number, from: Date, to: Date): Promise<(StoredTicket & { visits: number; repeated: boolean })[]> {
    const rows = await this.base({ ownerId: null })
      .where('t.site_id', siteId)
      .where('t.opened_at', '>=', from)
      .where('t.opened_at', '<', to)
      .select(
        this.db.raw("(SELECT COUNT(*) FROM ticket_transitions v WHERE v.ticket_id = t.id AND v.to_state = 'on-site') AS visits"),
        this.db.raw(
          `(t.resolved_at IS NOT NULL AND (
              EXISTS (SELECT 1 FROM ticket_transitions r WHERE r.ticket_id = t.id AND r.to_state = 'reopened'
                      AND r.at <= t.resolved_at + INTERVAL 90 DAY)
              OR EXISTS (SELECT 1 FROM tickets n WHERE n.fault_key = t.fault_key AND n.id <> t.id
                      AND n.opened_at >= t.resolved_at AND n.opened_at < t.resolved_at + INTERVAL 90 DAY))) AS repeated`,
        ),
      )
      .orderBy('t.id');
    return rows.map((r) => ({ ...toTicket(r), visits: Number(r.visits), repeated: Boolean(Number(r.repeated)) }));
  }

  /** An owner's SLA targets by severity (only the severities it has set). */
  async ownerSla(ownerId: number): Promise<Partial<Record<AlarmSeverity, SlaTargets>>> {
    const rows = await this.db('owner_sla').where({ owner_id: ownerId });
    return Object.fromEntries(
      rows.map((r) => [r.severity, { acknowledgeMin: r.acknowledge_min, onSiteMin: r.on_site_min, fixMin: r.fix_min }]),
    );
  }

  /** Replaces an owner's SLA targets (severities left out go back to the defaults), audited, in one transaction. */
  async replaceOwnerSla(ownerId: number, sla: Partial<Record<AlarmSeverity, SlaTargets>>, audit: AuditEntry): Promise<void> {
    await this.db.transaction(async (trx) => {
      await trx('owner_sla').where({ owner_id: ownerId }).delete();
      const rows = Object.entries(sla).map(([severity, t]) => ({
        owner_id: ownerId,
        severity,
        acknowledge_min: t.acknowledgeMin,
        on_site_min: t.onSiteMin,
        fix_min: t.fixMin,
      }));
      if (rows.length) await trx('owner_sla').insert(rows);
      await appendAudit(trx, audit);
    });
  }

  /** The owner of a site. */
  async ownerOfSite(siteId: number): Promise<number | undefined> {
    const r = await this.db('sites').where({ id: siteId }).first('owner_id');
    return r?.owner_id;
  }

  /** The ticket's holds in force, with the state of the hold command each carried (whether the unit confirmed it). */
  async holdsInForce(
    ticketId: number,
  ): Promise<{ unitId: number; serial: string; commandStatus: string | null; commandReason: string | null }[]> {
    const rows = await this.db('unit_holds as h')
      .join('units as u', 'u.id', 'h.unit_id')
      .leftJoin('commands as c', 'c.id', 'h.command_id')
      .where({ 'h.holder_kind': 'ticket', 'h.holder_id': ticketId })
      .whereNull('h.released_at')
      .orderBy('u.serial')
      .select('h.unit_id', 'u.serial', 'c.status', 'c.reason');
    return rows.map((r) => ({ unitId: r.unit_id, serial: r.serial, commandStatus: r.status ?? null, commandReason: r.reason ?? null }));
  }

  /** Open alarms of the ticket's unit (or of every unit of its site), and when its linked alarms last cleared. */
  async faultHealth(t: {
    id: number;
    unitId: number | null;
    siteId: number;
  }): Promise<{ activeAlarms: number; lastClearedAt: Date | null }> {
    const q = this.db('alarms').where({ state: 'active' });
    if (t.unitId !== null) q.where({ unit_id: t.unitId });
    else q.where({ site_id: t.siteId });
    const [{ n }] = (await q.count({ n: '*' })) as [{ n: number | string }];
    const last = await this.db('ticket_alarms as ta')
      .join('alarms as a', 'a.id', 'ta.alarm_id')
      .where('ta.ticket_id', t.id)
      .max({ at: 'a.cleared_at' })
      .first();
    return { activeAlarms: Number(n), lastClearedAt: (last?.at as Date | null) ?? null };
  }

  /**
   * Energy a unit did not make while its ticket's alarms were open [kWh]: per 15-minute interval, the mean energy of the
   * site's other units minus the unit's own (never below zero), summed over the alarms' open intervals. null when the
   * unit has no peers or no interval has peer data.
   */
  async peerShortfallKwh(ticketId: number, unitId: number, siteId: number, nowMs: number): Promise<number | null> {
    const spans: { raised_at: Date; cleared_at: Date | null }[] = await this.db('ticket_alarms as ta')
      .join('alarms as a', 'a.id', 'ta.alarm_id')
      .where('ta.ticket_id', ticketId)
      .select('a.raised_at', 'a.cleared_at');
    const peers: number[] = await this.db('units').where({ site_id: siteId }).whereNot({ id: unitId }).pluck('id');
    if (!spans.length || !peers.length) return null;
    let total = 0;
    let seen = false;
    for (const span of spans) {
      const [rows] = (await this.db.raw(
        `SELECT COUNT(*) AS n, SUM(GREATEST(0, p.peer_wh - COALESCE(u.energy_wh, 0))) AS wh
           FROM (SELECT bucket, AVG(energy_wh) AS peer_wh FROM telemetry_15m
                  WHERE unit_id IN (?) AND bucket >= ? AND bucket < ? GROUP BY bucket) p
           LEFT JOIN telemetry_15m u ON u.unit_id = ? AND u.bucket = p.bucket`,
        [peers, span.raised_at, span.cleared_at ?? new Date(nowMs), unitId],
      )) as [{ n: number | string; wh: number | string | null }[]];
      const r = rows[0]!;
      if (Number(r.n) > 0) seen = true;
      total += Number(r.wh ?? 0);
    }
    return seen ? Math.round(total) / 1000 : null;
  }

  async setLostEnergy(ticketId: number, kwh: number | null): Promise<void> {
    await this.db('tickets').where({ id: ticketId }).update({ lost_energy_kwh: kwh });
  }

  /** Enabled field crew members, by name (whom a ticket can be assigned to). */
  async activeCrew(): Promise<{ id: number; name: string }[]> {
    return this.db('users').where({ role: 'crew', disabled: false }).orderBy('name').select('id', 'name');
  }

  /** Whether a user is an enabled field crew member (the only people a ticket is assigned to). */
  async isActiveCrew(userId: number): Promise<boolean> {
    const r = await this.db('users').where({ id: userId, role: 'crew', disabled: false }).first('id');
    return r !== undefined;
  }

  /** The ids of a site's units (a site ticket holds them all). */
  async siteUnitIds(siteId: number): Promise<number[]> {
    return this.db('units').where({ site_id: siteId }).orderBy('id').pluck('id');
  }

  private base(scope: SiteScope) {
    const q = this.db('tickets as t')
      .join('sites as s', 's.id', 't.site_id')
      .leftJoin('units as u', 'u.id', 't.unit_id')
      .leftJoin('users as a', 'a.id', 't.assignee_id')
      .leftJoin('users as o', 'o.id', 't.opened_by')
      .select('t.*', 's.name as site_name', 's.owner_id', 'u.serial', 'a.name as assignee_name', 'o.name as opened_by_name');
    if (scope.ownerId !== null) q.where('s.owner_id', scope.ownerId);
    return q;
  }
}

async function insertTransition(trx: Knex.Transaction, ticketId: number, r: TransitionRecord): Promise<void> {
  await trx('ticket_transitions').insert({
    ticket_id: ticketId,
    from_state: r.from,
    to_state: r.to,
    at: r.at,
    by_user: r.by,
    note: r.note,
    reason: r.reason,
    assignee_id: r.assigneeId,
  });
}

async function linkAlarm(trx: Knex.Transaction, ticketId: number, a: AlarmToLink): Promise<void> {
  await trx('ticket_alarms')
    .insert({ ticket_id: ticketId, alarm_id: a.alarmId, evidence: JSON.stringify(a.evidence), linked_at: a.linkedAt })
    .onConflict(['ticket_id', 'alarm_id'])
    .ignore();
}

function rowOfPatch(p: TicketPatch): Record<string, unknown> {
  const row: Record<string, unknown> = { state: p.state };
  if (p.assigneeId !== undefined) row['assignee_id'] = p.assigneeId;
  if (p.acknowledgedAt !== undefined) row['acknowledged_at'] = p.acknowledgedAt;
  if (p.onSiteAt !== undefined) row['on_site_at'] = p.onSiteAt;
  if (p.resolvedAt !== undefined) row['resolved_at'] = p.resolvedAt;
  if (p.closedAt !== undefined) row['closed_at'] = p.closedAt;
  if (p.cancelledAt !== undefined) row['cancelled_at'] = p.cancelledAt;
  if (p.waitingReason !== undefined) row['waiting_reason'] = p.waitingReason;
  if (p.closure !== undefined) row['closure'] = p.closure === null ? null : JSON.stringify(p.closure);
  if (p.availabilityCategory !== undefined) row['availability_category'] = p.availabilityCategory;
  if (p.parts !== undefined) row['parts'] = JSON.stringify(p.parts);
  return row;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a joined row straight from the driver
function toTicket(r: any): StoredTicket {
  return {
    id: r.id,
    siteId: r.site_id,
    siteName: r.site_name,
    ownerId: r.owner_id,
    unitId: r.unit_id,
    serial: r.serial ?? null,
    kind: r.kind,
    severity: r.severity,
    title: r.title,
    description: r.description,
    state: r.state,
    version: r.version,
    assignee: r.assignee_id !== null ? { id: r.assignee_id, name: r.assignee_name } : null,
    faultKey: r.fault_key,
    openedAt: r.opened_at,
    openedBy: r.opened_by !== null ? { id: r.opened_by, name: r.opened_by_name } : null,
    acknowledgeDueAt: r.acknowledge_due_at,
    onSiteDueAt: r.on_site_due_at,
    fixDueAt: r.fix_due_at,
    acknowledgedAt: r.acknowledged_at,
    onSiteAt: r.on_site_at,
    resolvedAt: r.resolved_at,
    closedAt: r.closed_at,
    cancelledAt: r.cancelled_at,
    waitingReason: r.waiting_reason,
    closure: r.closure === null ? null : json<TicketClosure>(r.closure),
    availabilityCategory: r.availability_category,
    lostEnergyKwh: r.lost_energy_kwh,
    parts: json<TicketPart[]>(r.parts),
  };
}
