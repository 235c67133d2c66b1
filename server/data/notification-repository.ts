import type { AlarmSeverity } from '../../shared/contracts/alarms';
import type {
  NotificationKind,
  NotificationSettings,
  NotificationView,
  OnCallEntry,
  OnCallEntryView,
} from '../../shared/contracts/notifications';
import type { Role } from '../../shared/contracts/api';
import type { SlaClockName } from '../../shared/contracts/tickets';
import type { Db } from './db';
import { appendAudit, type AuditEntry } from './audit-repository';

/** A person who may be told something, with their stored choice (undefined: the defaults). */
export interface Recipient {
  id: number;
  name: string;
  email: string;
  role: Role;
  ownerId: number | null;
  settings: NotificationSettings | undefined;
}

export interface NewNotification {
  userId: number;
  kind: NotificationKind;
  title: string;
  body: string;
  ticketId: number | null;
  siteId: number | null;
  createdAt: Date;
}

/** A P1 ticket opened from an alarm that nobody has acknowledged yet. */
export interface UnacknowledgedTicket {
  id: number;
  siteId: number;
  openedAt: Date;
}

export interface DueClock {
  ticketId: number;
  clock: SlaClockName;
}

export interface DigestAlarm {
  id: number;
  siteId: number;
  siteName: string;
  serial: string | null;
  message: string;
  raisedAt: Date;
}

export interface DigestTicket {
  id: number;
  siteId: number;
  siteName: string;
  title: string;
  severity: AlarmSeverity;
  state: string;
  dueAt: Date;
  clock: SlaClockName;
}

const json = <T>(v: unknown): T => (typeof v === 'string' ? (JSON.parse(v) as T) : (v as T));
const isDuplicate = (err: unknown) => (err as { code?: string }).code === 'ER_DUP_ENTRY';

/** The clocks and the column that says each was met. */
const CLOCKS: { clock: SlaClockName; due: string; met: string; states: string[] }[] = [
  { clock: 'acknowledge', due: 'acknowledge_due_at', met: 'acknowledged_at', states: ['new', 'dispatched', 'reopened', 'waiting'] },
  { clock: 'onSite', due: 'on_site_due_at', met: 'on_site_at', states: ['new', 'dispatched', 'acknowledged', 'reopened', 'waiting'] },
  { clock: 'fix', due: 'fix_due_at', met: 'resolved_at', states: ['new', 'dispatched', 'acknowledged', 'on-site', 'waiting', 'reopened'] },
];

/** Notification settings, the on-call rota, dashboard notifications and what has been told about tickets (once each). */
export class NotificationRepository {
  constructor(private readonly db: Db) {}

  async settings(userId: number): Promise<NotificationSettings | undefined> {
    const r = await this.db('notification_settings').where({ user_id: userId }).first();
    return r ? toSettings(r) : undefined;
  }

  async putSettings(userId: number, s: NotificationSettings, at: Date): Promise<void> {
    const row = {
      site_ids: s.siteIds === null ? null : JSON.stringify(s.siteIds),
      severities: JSON.stringify(s.severities),
      by_email: s.email,
      in_dashboard: s.dashboard,
      updated_at: at,
    };
    await this.db('notification_settings')
      .insert({ user_id: userId, ...row })
      .onConflict('user_id')
      .merge(row);
  }

  /** Enabled people of the given roles (or the given ids), with their settings. */
  async recipients(by: { roles?: readonly Role[]; ids?: readonly number[] }): Promise<Recipient[]> {
    const q = this.db('users as u')
      .leftJoin('notification_settings as ns', 'ns.user_id', 'u.id')
      .where('u.disabled', false)
      .orderBy('u.id')
      .select('u.id', 'u.name', 'u.email', 'u.role', 'u.owner_id', 'ns.site_ids', 'ns.severities', 'ns.by_email', 'ns.in_dashboard');
    if (by.roles) q.whereIn('u.role', by.roles);
    if (by.ids) q.whereIn('u.id', by.ids);
    return (await q).map((r) => ({
      id: r.id,
      name: r.name,
      email: r.email,
      role: r.role,
      ownerId: r.owner_id,
      settings: r.severities === null ? undefined : toSettings(r),
    }));
  }

  async siteIdsOfScope(ownerId: number | null): Promise<number[]> {
    const q = this.db('sites').orderBy('id').pluck('id');
    if (ownerId !== null) q.where({ owner_id: ownerId });
    return q;
  }

  // ---- the on-call rota

  async rota(): Promise<OnCallEntryView[]> {
    const rows = await this.db('on_call as oc')
      .join('users as u', 'u.id', 'oc.user_id')
      .leftJoin('sites as s', 's.id', 'oc.site_id')
      .orderBy(['oc.from_at', 'oc.id'])
      .select('oc.*', 'u.name as user_name', 'u.role', 's.name as site_name');
    return rows.map((r) => ({
      id: r.id,
      userId: r.user_id,
      userName: r.user_name,
      role: r.role,
      siteId: r.site_id,
      siteName: r.site_name,
      from: (r.from_at as Date).toISOString(),
      to: (r.to_at as Date).toISOString(),
    }));
  }

  /** Replaces the whole rota, audited, in one transaction. */
  async replaceRota(entries: OnCallEntry[], audit: AuditEntry): Promise<void> {
    await this.db.transaction(async (trx) => {
      await trx('on_call').delete();
      if (entries.length)
        await trx('on_call').insert(
          entries.map((e) => ({ user_id: e.userId, site_id: e.siteId, from_at: new Date(e.from), to_at: new Date(e.to) })),
        );
      await appendAudit(trx, audit);
    });
  }

  /** Enabled people of the given roles, by name (who may be put on the rota). */
  async peopleWithRoles(roles: readonly string[]): Promise<{ id: number; name: string; role: string }[]> {
    return this.db('users').where({ disabled: false }).whereIn('role', roles).orderBy('name').select('id', 'name', 'role');
  }

  /** Enabled people on call at `at` for the site or the whole fleet. */
  async onCallAt(siteId: number, at: Date): Promise<number[]> {
    const ids: number[] = await this.db('on_call as oc')
      .join('users as u', 'u.id', 'oc.user_id')
      .where('u.disabled', false)
      .where('oc.from_at', '<=', at)
      .where('oc.to_at', '>', at)
      .where((q) => q.where('oc.site_id', siteId).orWhereNull('oc.site_id'))
      .distinct()
      .pluck('oc.user_id');
    return ids;
  }

  /** The users whose ids are given and exist, with their role (rota validation). */
  async usersByIds(ids: number[]): Promise<{ id: number; role: Role; disabled: boolean }[]> {
    if (!ids.length) return [];
    return this.db('users').whereIn('id', ids).select('id', 'role', 'disabled');
  }

  async existingSiteIds(ids: number[]): Promise<number[]> {
    if (!ids.length) return [];
    return this.db('sites').whereIn('id', ids).pluck('id');
  }

  // ---- dashboard notifications

  async insertNotification(n: NewNotification): Promise<NotificationView> {
    const [id] = await this.db('notifications').insert({
      user_id: n.userId,
      kind: n.kind,
      title: n.title.slice(0, 300),
      body: n.body.slice(0, 4000),
      ticket_id: n.ticketId,
      site_id: n.siteId,
      created_at: n.createdAt,
    });
    return (await this.notification(n.userId, id!))!;
  }

  async notification(userId: number, id: number): Promise<NotificationView | undefined> {
    const r = await this.db('notifications').where({ id, user_id: userId }).first();
    return r ? toNotification(r) : undefined;
  }

  async notifications(userId: number, f: { unreadOnly: boolean; limit: number }): Promise<NotificationView[]> {
    const q = this.db('notifications').where({ user_id: userId }).orderBy('id', 'desc').limit(f.limit);
    if (f.unreadOnly) q.whereNull('read_at');
    return (await q).map(toNotification);
  }

  async unreadCount(userId: number): Promise<number> {
    const r = await this.db('notifications').where({ user_id: userId }).whereNull('read_at').count<{ n: number }[]>('id as n');
    return Number(r[0]?.n ?? 0);
  }

  /** Marks one of the person's notifications read (the first read time stays); undefined when it is not theirs. */
  async markRead(userId: number, id: number, at: Date): Promise<NotificationView | undefined> {
    await this.db('notifications').where({ id, user_id: userId }).whereNull('read_at').update({ read_at: at });
    return this.notification(userId, id);
  }

  // ---- told once

  /** Records that a ticket's notice is being given; false when it was given before (it is then not given again). */
  async claimNotice(ticketId: number, notice: string, at: Date): Promise<boolean> {
    try {
      await this.db('ticket_notices').insert({ ticket_id: ticketId, notice, at });
      return true;
    } catch (err) {
      if (isDuplicate(err)) return false;
      throw err;
    }
  }

  async notices(ticketId: number): Promise<string[]> {
    return this.db('ticket_notices').where({ ticket_id: ticketId }).orderBy('at').pluck('notice');
  }

  /** Records the day's digest for a person; false when it went already. */
  async claimDigest(userId: number, localDate: string, at: Date): Promise<boolean> {
    try {
      await this.db('digest_runs').insert({ user_id: userId, local_date: localDate, at });
      return true;
    } catch (err) {
      if (isDuplicate(err)) return false;
      throw err;
    }
  }

  /** Who last dispatched the ticket (null when nobody has, or the system did). */
  async dispatcherOf(ticketId: number): Promise<number | null> {
    const r = await this.db('ticket_transitions')
      .where({ ticket_id: ticketId, to_state: 'dispatched' })
      .whereNotNull('by_user')
      .orderBy('id', 'desc')
      .first('by_user');
    return r?.by_user ?? null;
  }

  /** Paged P1 tickets opened at or before `before`, still open and not acknowledged, not yet escalated. */
  async unacknowledgedP1(before: Date): Promise<UnacknowledgedTicket[]> {
    const rows = await this.db('tickets as t')
      .join('ticket_notices as p', (j) => j.on('p.ticket_id', 't.id').andOnVal('p.notice', 'p1-page'))
      .leftJoin('ticket_notices as n', (j) => j.on('n.ticket_id', 't.id').andOnVal('n.notice', 'escalation'))
      .whereNull('n.ticket_id')
      .where({ 't.severity': 'P1' })
      .whereNull('t.acknowledged_at')
      .whereIn('t.state', ['new', 'dispatched', 'reopened', 'waiting'])
      .where('t.opened_at', '<=', before)
      .orderBy('t.id')
      .select('t.id', 't.site_id', 't.opened_at');
    return rows.map((r) => ({ id: r.id, siteId: r.site_id, openedAt: r.opened_at }));
  }

  /** SLA clocks of open tickets that ran out before `now`, unmet, whose breach has not been told. */
  async breachedClocks(now: Date): Promise<DueClock[]> {
    const out: DueClock[] = [];
    for (const c of CLOCKS) {
      const rows = await this.db('tickets as t')
        .leftJoin('ticket_notices as n', (j) => j.on('n.ticket_id', 't.id').andOnVal('n.notice', `breach-${c.clock}`))
        .whereNull('n.ticket_id')
        .whereNull(`t.${c.met}`)
        .whereIn('t.state', c.states)
        .where(`t.${c.due}`, '<', now)
        .orderBy('t.id')
        .pluck('t.id');
      for (const id of rows) out.push({ ticketId: id, clock: c.clock });
    }
    return out;
  }

  /** P4 alarms raised in [from, to) at the given sites. */
  async p4Alarms(from: Date, to: Date, siteIds: number[]): Promise<DigestAlarm[]> {
    if (!siteIds.length) return [];
    const rows = await this.db('alarms as a')
      .join('sites as s', 's.id', 'a.site_id')
      .leftJoin('units as u', 'u.id', 'a.unit_id')
      .where('a.severity', 'P4')
      .where('a.raised_at', '>=', from)
      .where('a.raised_at', '<', to)
      .whereIn('a.site_id', siteIds)
      .orderBy(['s.name', 'a.raised_at'])
      .limit(500)
      .select('a.id', 'a.site_id', 's.name as site_name', 'u.serial', 'a.message', 'a.raised_at');
    return rows.map((r) => ({
      id: r.id,
      siteId: r.site_id,
      siteName: r.site_name,
      serial: r.serial,
      message: r.message,
      raisedAt: r.raised_at,
    }));
  }

  /** Open tickets at the given sites with an unmet clock due in [from, to): the next such clock of each. */
  async ticketsDue(from: Date, to: Date, siteIds: number[]): Promise<DigestTicket[]> {
    if (!siteIds.length) return [];
    const out: DigestTicket[] = [];
    const seen = new Set<number>();
    for (const c of CLOCKS) {
      const rows = await this.db('tickets as t')
        .join('sites as s', 's.id', 't.site_id')
        .whereNull(`t.${c.met}`)
        .whereIn('t.state', c.states)
        .where(`t.${c.due}`, '>=', from)
        .where(`t.${c.due}`, '<', to)
        .whereIn('t.site_id', siteIds)
        .orderBy(`t.${c.due}`)
        .limit(500)
        .select('t.id', 't.site_id', 's.name as site_name', 't.title', 't.severity', 't.state', `t.${c.due} as due_at`);
      for (const r of rows) {
        if (seen.has(r.id)) continue;
        seen.add(r.id);
        out.push({
          id: r.id,
          siteId: r.site_id,
          siteName: r.site_name,
          title: r.title,
          severity: r.severity,
          state: r.state,
          dueAt: r.due_at,
          clock: c.clock,
        });
      }
    }
    return out.sort((a, b) => a.dueAt.getTime() - b.dueAt.getTime());
  }
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a row straight from the driver
function toSettings(r: any): NotificationSettings {
  return {
    siteIds: r.site_ids === null ? null : json<number[]>(r.site_ids),
    severities: json<AlarmSeverity[]>(r.severities),
    email: Boolean(r.by_email),
    dashboard: Boolean(r.in_dashboard),
  };
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a row straight from the driver
function toNotification(r: any): NotificationView {
  return {
    id: r.id,
    kind: r.kind,
    title: r.title,
    body: r.body,
    ticketId: r.ticket_id,
    siteId: r.site_id,
    createdAt: (r.created_at as Date).toISOString(),
    readAt: r.read_at ? (r.read_at as Date).toISOString() : null,
  };
}
