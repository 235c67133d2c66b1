import type { Logger } from 'pino';
import type { AlarmSeverity } from '../../shared/contracts/alarms';
import {
  DEFAULT_NOTIFICATION_SETTINGS,
  ON_CALL_ROLES,
  type NotificationKind,
  type NotificationList,
  type NotificationSettings,
  type NotificationView,
  type OnCallEntry,
  type OnCallRota,
} from '../../shared/contracts/notifications';
import type { SlaClockName, TicketView } from '../../shared/contracts/tickets';
import { badRequest, notFound } from '../errors/app-error';
import type { NotificationRepository, Recipient } from '../data/notification-repository';
import type { MailMessage } from '../mail/smtp-transport';
import type { Caller } from './caller';
import type { LiveHub } from './live-hub';
import { localDate, utcWindowOfLocalDate } from './local-time';
import type { TicketEvent } from './ticket-service';

export interface NotificationOptions {
  /** A P1 ticket nobody has acknowledged this long after it opened goes to every technician of its site [ms]. */
  escalateAfterMs: number;
  /** Escalations and breaches older than this are not told any more (after a long stop, or a restored database) [ms]. */
  lookbackMs: number;
  /** The daily digest goes out from this local hour on, once a day, in `digestTimeZone`. */
  digestHour: number;
  digestTimeZone: string;
  /** The dashboard's address, for links in mails; none when unknown. */
  publicUrl?: string;
  now: () => number;
}

export const DEFAULT_NOTIFICATION_OPTIONS: NotificationOptions = {
  escalateAfterMs: 15 * 60_000,
  lookbackMs: 24 * 3600_000,
  digestHour: 7,
  digestTimeZone: 'UTC',
  now: Date.now,
};

/** Where mail goes (the mail service). */
export interface MailSender {
  send(kind: string, m: MailMessage): Promise<number>;
}

/**
 * Said in every mail that sends someone out to a unit (job.md §6, in our words): the product's hold is software, not an
 * isolation of energy.
 */
export const FIELD_CAUTION = [
  'Before you work on a unit:',
  '- Moving parts and pinch points: a tracker can move at any time until it is held, and automatic wind or snow stow may still move units that are not held.',
  '- Stored mechanical energy: gravity, wind load, springs and batteries can move the structure even with the drive off.',
  '- The modules are live whenever light falls on them; DC arcs do not go out by themselves.',
  '- Do not work on or under a unit above the wind limit, while it stows, or in lightning.',
  '- Checking in places a software hold. A software hold is not lockout/tagout: stow the unit, then isolate and lock out every energy source, batteries included, as the site procedure and the manufacturer require.',
  '- Local codes and licensed practice govern the work; electrical work is for qualified, authorised people only.',
].join('\n');

const CLOCK_WORDS: Record<SlaClockName, string> = {
  acknowledge: 'acknowledgement',
  onSite: 'arrival on site',
  fix: 'fix',
};

const utc = (iso: string | Date) => `${(typeof iso === 'string' ? iso : iso.toISOString()).slice(0, 16).replace('T', ' ')} UTC`;
const whereOf = (t: TicketView) => (t.serial ? `unit ${t.serial} at ${t.siteName}` : `${t.siteName} (the whole site)`);

interface Notice {
  kind: NotificationKind;
  subject: string;
  body: string;
  ticketId: number | null;
  siteId: number | null;
}

/**
 * Who hears about what, by e-mail and in the dashboard: assignments (the crew member), P1 tickets from alarms (the
 * people on call, then every technician of the site if nobody acknowledges within 15 min), SLA breaches (the
 * dispatcher and the site's technicians, once per clock), resolutions (the dispatcher) and a daily digest per
 * technician. Owners are never told anything here: every notice names fleet work. Delivery failures are logged and
 * stored in the outbox; they never reach whatever caused the notice.
 */
export class NotificationService {
  private readonly opts: NotificationOptions;
  private timer: NodeJS.Timeout | undefined;
  private sweeping: Promise<unknown> = Promise.resolve();

  constructor(
    private readonly repo: NotificationRepository,
    private readonly mail: MailSender,
    private readonly live: Pick<LiveHub, 'publishToUser'>,
    private readonly readTicket: (id: number) => Promise<TicketView>,
    private readonly log: Logger,
    opts: Partial<NotificationOptions> = {},
  ) {
    this.opts = { ...DEFAULT_NOTIFICATION_OPTIONS, ...opts };
  }

  start(intervalMs = 60_000): void {
    this.timer = setInterval(() => void this.sweep().catch((err) => this.log.error({ err }, 'notification sweep failed')), intervalMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  async settle(): Promise<void> {
    await this.sweeping.catch(() => undefined);
  }

  // ---- a person's own

  async settings(c: Caller): Promise<NotificationSettings> {
    return (await this.repo.settings(c.id)) ?? DEFAULT_NOTIFICATION_SETTINGS;
  }

  async setSettings(c: Caller, s: NotificationSettings): Promise<NotificationSettings> {
    if (s.siteIds !== null) {
      const visible = new Set(await this.repo.siteIdsOfScope(c.role === 'owner' ? (c.ownerId ?? -1) : null));
      const unknown = [...new Set(s.siteIds)].filter((id) => !visible.has(id));
      if (unknown.length)
        throw badRequest(`No such site${unknown.length > 1 ? 's' : ''} for you: ${unknown.join(', ')}.`, {
          siteIds: `Not a site you may see: ${unknown.join(', ')}.`,
        });
    }
    const clean: NotificationSettings = {
      siteIds: s.siteIds === null ? null : [...new Set(s.siteIds)].sort((a, b) => a - b),
      severities: [...new Set(s.severities)].sort(),
      email: s.email,
      dashboard: s.dashboard,
    };
    await this.repo.putSettings(c.id, clean, new Date(this.opts.now()));
    return clean;
  }

  async list(c: Caller, f: { unreadOnly: boolean; limit: number }): Promise<NotificationList> {
    const [unread, items] = await Promise.all([this.repo.unreadCount(c.id), this.repo.notifications(c.id, f)]);
    return { unread, items };
  }

  async read(c: Caller, id: number): Promise<NotificationView> {
    const n = await this.repo.markRead(c.id, id, new Date(this.opts.now()));
    if (!n) throw notFound('Notification');
    this.live.publishToUser(c.id, { type: 'notification', notification: null, unread: await this.repo.unreadCount(c.id) });
    return n;
  }

  // ---- the rota

  async rota(): Promise<OnCallRota> {
    const [entries, candidates] = await Promise.all([this.repo.rota(), this.repo.peopleWithRoles(ON_CALL_ROLES)]);
    const now = this.opts.now();
    return { entries, now: entries.filter((e) => Date.parse(e.from) <= now && now < Date.parse(e.to)), candidates };
  }

  async setRota(c: Caller, entries: OnCallEntry[]): Promise<OnCallRota> {
    const fields: Record<string, string> = {};
    const users = new Map((await this.repo.usersByIds([...new Set(entries.map((e) => e.userId))])).map((u) => [u.id, u]));
    const sites = new Set(await this.repo.existingSiteIds([...new Set(entries.flatMap((e) => (e.siteId === null ? [] : [e.siteId])))]));
    entries.forEach((e, i) => {
      const u = users.get(e.userId);
      if (!u) fields[`entries.${i}.userId`] = `No such person: ${e.userId}.`;
      else if (u.disabled) fields[`entries.${i}.userId`] = 'This person is disabled.';
      else if (!(ON_CALL_ROLES as readonly string[]).includes(u.role))
        fields[`entries.${i}.userId`] = `Only ${ON_CALL_ROLES.join(', ')} may be on call, not ${u.role}.`;
      if (e.siteId !== null && !sites.has(e.siteId)) fields[`entries.${i}.siteId`] = `No such site: ${e.siteId}.`;
      if (!(Date.parse(e.from) < Date.parse(e.to))) fields[`entries.${i}.to`] = 'Must be after from.';
    });
    if (Object.keys(fields).length) throw badRequest(`The rota has ${Object.keys(fields).length} problem(s).`, fields);
    await this.repo.replaceRota(entries, {
      userId: c.id,
      action: 'on-call-update',
      target: 'on-call',
      detail: { entries: entries.length },
    });
    return this.rota();
  }

  // ---- ticket events

  /** The ticket service's listener. */
  async onTicketEvent(e: TicketEvent): Promise<void> {
    const t = e.ticket;
    // A ticket opened for a P1 alarm (by the alarm rule, or by a technician from the alarm card).
    if (e.from === null && e.alarm && t.severity === 'P1') await this.pageOnCall(t);
    if (e.to === 'dispatched' && t.assignee) await this.tellAssignee(t, e.byUserId);
    if (e.to === 'resolved') await this.tellDispatcher(t);
  }

  private async pageOnCall(t: TicketView): Promise<void> {
    if (!(await this.repo.claimNotice(t.id, 'p1-page', new Date(this.opts.now())))) return;
    const onCall = await this.repo.onCallAt(t.siteId, new Date(this.opts.now()));
    let people = onCall.length ? staff(await this.repo.recipients({ ids: onCall })) : [];
    const nobody = !people.length;
    if (nobody) people = await this.techniciansOf(t.siteId);
    const mins = Math.round(this.opts.escalateAfterMs / 60_000);
    const body = [
      `A P1 alarm has opened ticket ${t.id} at ${whereOf(t)}.`,
      '',
      ...this.ticketLines(t),
      '',
      nobody
        ? 'Nobody is on call for this site now, so every technician of the site gets this.'
        : `You are on call. If nobody acknowledges the ticket within ${mins} minutes, every technician of the site is told.`,
      'Dispatch a crew member (or go yourself) and acknowledge the ticket in Brightward.',
      '',
      FIELD_CAUTION,
      this.link(t.id),
    ].join('\n');
    await this.deliverAll(
      people,
      { kind: 'p1-page', subject: `P1 at ${t.siteName}: ${t.title}`, body, ticketId: t.id, siteId: t.siteId },
      true,
    );
  }

  private async tellAssignee(t: TicketView, byUserId: number | null): Promise<void> {
    const [crew] = staff(await this.repo.recipients({ ids: [t.assignee!.id] }));
    if (!crew) return;
    const by = byUserId !== null ? (await this.repo.recipients({ ids: [byUserId] }))[0]?.name : undefined;
    const body = [
      `Hello ${crew.name},`,
      '',
      `${by ?? 'The control room'} has sent you to ${whereOf(t)}.`,
      '',
      ...this.ticketLines(t),
      '',
      'Acknowledge the ticket in Brightward (My work) when you have read this, and check in when you reach the unit.',
      '',
      FIELD_CAUTION,
      this.link(t.id),
    ].join('\n');
    await this.deliverAll(
      [crew],
      { kind: 'assigned', subject: `Ticket ${t.id} (${t.severity}) assigned to you: ${t.title}`, body, ticketId: t.id, siteId: t.siteId },
      false,
    );
  }

  private async tellDispatcher(t: TicketView): Promise<void> {
    const dispatcher = await this.repo.dispatcherOf(t.id);
    if (dispatcher === null) return;
    const people = staff(await this.repo.recipients({ ids: [dispatcher] }));
    const c = t.closure;
    const body = [
      `${t.assignee?.name ?? 'The crew'} has resolved ticket ${t.id} at ${whereOf(t)}.`,
      '',
      ...this.ticketLines(t),
      ...(c ? ['', `Closure: ${c.component}; ${c.failureMode}; cause: ${c.cause}; action: ${c.action}.`] : []),
      '',
      'Close it once the unit has reported healthy for a while, or reopen it if the fault is back.',
      this.link(t.id),
    ].join('\n');
    await this.deliverAll(
      people,
      { kind: 'resolved', subject: `Ticket ${t.id} resolved: ${t.title}`, body, ticketId: t.id, siteId: t.siteId },
      false,
    );
  }

  // ---- the timer

  /** Escalations, breaches and digests that are due; returns what it did (tests). */
  sweep(): Promise<{ escalated: number; breaches: number; digests: number }> {
    const run = this.sweeping.catch(() => undefined).then(() => this.sweepOnce());
    this.sweeping = run;
    return run;
  }

  private async sweepOnce(): Promise<{ escalated: number; breaches: number; digests: number }> {
    const now = this.opts.now();
    let escalated = 0;
    let breaches = 0;
    for (const u of await this.repo.unacknowledgedP1(new Date(now - this.opts.escalateAfterMs))) {
      // Claimed either way: a stale one is marked as dealt with, so later sweeps do not look at it again.
      if (!(await this.repo.claimNotice(u.id, 'escalation', new Date(now)))) continue;
      if (u.openedAt.getTime() < now - this.opts.lookbackMs) continue;
      await this.escalate(await this.readTicket(u.id)).catch((err) => this.log.error({ err, ticketId: u.id }, 'escalation not sent'));
      escalated++;
    }
    for (const b of await this.repo.breachedClocks(new Date(now))) {
      const t = await this.readTicket(b.ticketId);
      const clock = t.clocks.find((c) => c.name === b.clock)!;
      if (!(await this.repo.claimNotice(t.id, `breach-${b.clock}`, new Date(now)))) continue;
      if (Date.parse(clock.dueAt) < now - this.opts.lookbackMs) continue;
      await this.tellBreach(t, b.clock).catch((err) => this.log.error({ err, ticketId: t.id }, 'breach notice not sent'));
      breaches++;
    }
    const digests = await this.digests(now);
    return { escalated, breaches, digests };
  }

  private async escalate(t: TicketView): Promise<void> {
    const mins = Math.round(this.opts.escalateAfterMs / 60_000);
    const body = [
      `Nobody has acknowledged P1 ticket ${t.id} at ${whereOf(t)} within ${mins} minutes of its opening.`,
      'Every technician of the site gets this. Make sure someone takes it now.',
      '',
      ...this.ticketLines(t),
      '',
      FIELD_CAUTION,
      this.link(t.id),
    ].join('\n');
    await this.deliverAll(
      await this.techniciansOf(t.siteId),
      {
        kind: 'escalation',
        subject: `P1 not acknowledged after ${mins} min at ${t.siteName}: ${t.title}`,
        body,
        ticketId: t.id,
        siteId: t.siteId,
      },
      true,
    );
  }

  private async tellBreach(t: TicketView, clock: SlaClockName): Promise<void> {
    const c = t.clocks.find((x) => x.name === clock)!;
    const dispatcher = await this.repo.dispatcherOf(t.id);
    const techs = (await this.techniciansOf(t.siteId)).filter((r) => covers(r, t.siteId, t.severity));
    const people = [...(dispatcher !== null ? staff(await this.repo.recipients({ ids: [dispatcher] })) : []), ...techs];
    const body = [
      `The ${CLOCK_WORDS[clock]} target of ticket ${t.id} at ${whereOf(t)} has passed: it was due ${utc(c.dueAt)}.`,
      '',
      ...this.ticketLines(t),
      '',
      'This is said once per target.',
      this.link(t.id),
    ].join('\n');
    await this.deliverAll(
      unique(people),
      {
        kind: 'sla-breach',
        subject: `SLA breached, ticket ${t.id} (${t.severity}): ${CLOCK_WORDS[clock]} overdue`,
        body,
        ticketId: t.id,
        siteId: t.siteId,
      },
      false,
    );
  }

  /** Each technician's digest of the local day, once, from the digest hour on. Empty digests are not sent. */
  private async digests(now: number): Promise<number> {
    const zone = this.opts.digestTimeZone;
    const hour = Number(new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', hourCycle: 'h23' }).format(now));
    if (hour < this.opts.digestHour) return 0;
    const today = localDate(now, zone);
    const tomorrow = localDate(now + 86_400_000, zone);
    const win = utcWindowOfLocalDate(tomorrow);
    let sent = 0;
    for (const r of await this.repo.recipients({ roles: ['technician'] })) {
      const s = r.settings ?? DEFAULT_NOTIFICATION_SETTINGS;
      if (!s.email && !s.dashboard) continue;
      if (!(await this.repo.claimDigest(r.id, today, new Date(now)))) continue;
      const sites = s.siteIds ?? (await this.repo.siteIdsOfScope(null));
      const alarms = s.severities.includes('P4') ? await this.repo.p4Alarms(new Date(now - 86_400_000), new Date(now), sites) : [];
      const due = (await this.repo.ticketsDue(win.from, win.to, sites)).filter(
        (t) => localDate(t.dueAt.getTime(), zone) === tomorrow && s.severities.includes(t.severity),
      );
      if (!alarms.length && !due.length) continue;
      const body = [
        `Hello ${r.name},`,
        '',
        `Your digest for ${today} (${zone}).`,
        '',
        `P4 alarms of the last 24 hours: ${alarms.length}`,
        ...alarms.map((a) => `- ${a.siteName}${a.serial ? `, ${a.serial}` : ''}: ${a.message} (${utc(a.raisedAt)})`),
        '',
        `Tickets due tomorrow (${tomorrow}): ${due.length}`,
        ...due.map(
          (t) => `- Ticket ${t.id} (${t.severity}, ${t.state}) at ${t.siteName}: ${t.title}; ${CLOCK_WORDS[t.clock]} due ${utc(t.dueAt)}`,
        ),
        this.opts.publicUrl ? `\nThe ticket board: ${this.opts.publicUrl}/tickets` : '',
      ].join('\n');
      await this.deliverAll(
        [r],
        {
          kind: 'digest',
          subject: `Brightward digest ${today}: ${alarms.length} P4 alarm(s), ${due.length} ticket(s) due tomorrow`,
          body,
          ticketId: null,
          siteId: null,
        },
        false,
      ).catch((err) => this.log.error({ err, userId: r.id }, 'digest not sent'));
      sent++;
    }
    return sent;
  }

  // ---- delivery

  /** Technicians who look after the site (their settings cover it; by default every site). */
  private async techniciansOf(siteId: number): Promise<Recipient[]> {
    return (await this.repo.recipients({ roles: ['technician'] })).filter((r) => {
      const s = r.settings ?? DEFAULT_NOTIFICATION_SETTINGS;
      return s.siteIds === null || s.siteIds.includes(siteId);
    });
  }

  private ticketLines(t: TicketView): string[] {
    const due = (n: string) => t.clocks.find((c) => c.name === n)!.dueAt;
    return [
      `Ticket ${t.id} (${t.severity}): ${t.title}`,
      `Where: ${whereOf(t)}`,
      ...(t.description ? [`What: ${t.description}`] : []),
      `State: ${t.state}${t.assignee ? `, assigned to ${t.assignee.name}` : ', not assigned yet'}`,
      `Targets: acknowledge by ${utc(due('acknowledge'))}, on site by ${utc(due('onSite'))}, fixed by ${utc(due('fix'))}`,
    ];
  }

  private link(ticketId: number): string {
    return this.opts.publicUrl ? `\nOpen the ticket: ${this.opts.publicUrl}/tickets/${ticketId}` : '';
  }

  /**
   * Tells each person by the ways they chose (`force`: both ways, for P1 pages). Each person's delivery is apart: one
   * failure does not stop the others.
   */
  private async deliverAll(people: Recipient[], n: Notice, force: boolean): Promise<void> {
    const at = new Date(this.opts.now());
    for (const r of staff(people)) {
      const s = r.settings ?? DEFAULT_NOTIFICATION_SETTINGS;
      try {
        if (force || s.dashboard) {
          const view = await this.repo.insertNotification({
            userId: r.id,
            kind: n.kind,
            title: n.subject,
            body: n.body,
            ticketId: n.ticketId,
            siteId: n.siteId,
            createdAt: at,
          });
          this.live.publishToUser(r.id, { type: 'notification', notification: view, unread: await this.repo.unreadCount(r.id) });
        }
        if (force || s.email) await this.mail.send(n.kind, { to: [r.email], subject: n.subject, text: n.body });
      } catch (err) {
        this.log.error({ err, userId: r.id, kind: n.kind }, 'notification not delivered');
      }
    }
  }
}

/** Owners never hear about fleet work. */
const staff = (people: Recipient[]) => people.filter((r) => r.role !== 'owner');

const unique = (people: Recipient[]) => [...new Map(people.map((p) => [p.id, p])).values()];

function covers(r: Recipient, siteId: number, severity: AlarmSeverity): boolean {
  const s = r.settings ?? DEFAULT_NOTIFICATION_SETTINGS;
  return (s.siteIds === null || s.siteIds.includes(siteId)) && s.severities.includes(severity);
}
