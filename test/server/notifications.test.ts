import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import WebSocket from 'ws';
import { signedIn } from '../helpers/signed-in';
import { startTestStack } from '../helpers/test-stack';
import { startLocalMailService, type LocalMailService, type ReceivedMail } from '../../server/mail/local-mail-service';
import { ConfigError, loadConfig } from '../../server/config';
import type { TicketView } from '../../shared/contracts/tickets';
import type { AlarmView } from '../../shared/contracts/alarms';
import type { OutboxMessage } from '../../shared/contracts/mail';
import type { NotificationList } from '../../shared/contracts/notifications';
import type { LiveServerMessage } from '../../shared/contracts/live';
import { MailOutboxRepository } from '../../server/data/mail-outbox-repository';
import { MailService } from '../../server/services/mail-service';
import { smtpTransport } from '../../server/mail/smtp-transport';
import { pino } from 'pino';

/** Added to the clocks of tickets, notifications and mail: the 15-minute escalation and SLA breaches without waiting. */
let clockOffsetMs = 0;
const now = () => Date.now() + clockOffsetMs;
let sink: LocalMailService;
let stack: Awaited<ReturnType<typeof startTestStack>>;

beforeAll(async () => {
  sink = await startLocalMailService();
  stack = await startTestStack({
    seed: true,
    env: { BW_SMTP_PORT: String(sink.port), BW_SMTP_FROM: 'Brightward test <ops@brightward.example>' },
    stack: {
      tickets: { now },
      // The digest hour is midnight, so the first sweep of the day sends it (the digest test runs first).
      notifications: { now, digestHour: 0, digestTimeZone: 'UTC', publicUrl: 'https://ops.brightward.example' },
      mail: { now, attempts: 3, backoffMs: () => 100 },
    },
  });
}, 60_000);
afterAll(async () => {
  await stack?.stop();
  await sink?.close();
});

const as = signedIn(() => stack.http);
const ADMIN = 'admin@saltmarsh.example';
const TECH = 'tech1@saltmarsh.example';
const TECH2 = 'tech2@saltmarsh.example';
const TECH3 = 'tech3@saltmarsh.example';
const CREW = 'crew1@saltmarsh.example';
const OWNER = 'owner@quillmoor.example';
const OWNERS = ['owner@quillmoor.example', 'owner@fenwicklane.example', 'owner@tindara.example', 'owner@nyasoro.example'];

const unitId = (serial: string) => stack.units.get(serial)!.id;
const siteIdOf = (serial: string) => stack.units.get(serial)!.siteId;

/** Waits until the ticket listeners and the mail tries under way are done. */
async function settled(): Promise<void> {
  await stack.tickets.settle();
  await stack.notifications.settle();
  await stack.mail.settle();
}

async function until<T>(what: string, probe: () => Promise<T | undefined> | T | undefined, ms = 5000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`Timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

const mailsAbout = (ticketId: number, kind: RegExp): ReceivedMail[] =>
  sink.messages.filter((m) => kind.test(m.subject) && m.text.includes(`Ticket ${ticketId} `));

async function open(serial: string, severity: string, title: string): Promise<TicketView> {
  return (
    await (
      await as(TECH)
    ).agent
      .post('/api/tickets')
      .send({ unitId: unitId(serial), title, severity })
      .expect(201)
  ).body;
}
const move = async (email: string, id: number, body: object) => (await as(email)).agent.post(`/api/tickets/${id}/transition`).send(body);

async function raise(serial: string, kind: string, severity: string): Promise<AlarmView> {
  const u = stack.units.get(serial)!;
  const at = new Date(now());
  const [id] = await stack.db('alarms').insert({
    unit_id: u.id,
    site_id: u.siteId,
    kind,
    severity,
    state: 'active',
    message: `${kind} on ${serial}`,
    advice: 'Look at it.',
    evidence: '{}',
    first_seen_at: at,
    raised_at: at,
    last_seen_at: at,
  });
  const view = (await (await as(ADMIN)).agent.get(`/api/alarms/${id}`).expect(200)).body as AlarmView;
  await stack.tickets.onAlarmRaised(view);
  return view;
}

const outboxRow = async (subject: RegExp): Promise<OutboxMessage | undefined> =>
  ((await (await as(ADMIN)).agent.get('/api/mail/outbox?limit=1000').expect(200)).body as OutboxMessage[]).find((m) =>
    subject.test(m.subject),
  );

describe('the daily digest', () => {
  it("sends each technician the day's P4 alarms and the tickets due tomorrow, once a day, and nothing to owners", async () => {
    await raise('QHL-2403', 'soiling', 'P4');
    // A P4 ticket opened now is due to be acknowledged in 24 h: tomorrow.
    const t = await open('QED-2402', 'P4', 'Clean the detector pair');
    const r = await stack.notifications.sweep();
    expect(r.digests).toBe(2); // the two demo technicians
    await settled();
    const digests = sink.messages.filter((m) => m.subject.startsWith('Brightward digest'));
    expect(digests.map((m) => m.to).sort()).toEqual([[TECH], [TECH2]]);
    const text = digests[0]!.text;
    expect(text).toMatch(/P4 alarms of the last 24 hours: [1-9]/);
    expect(text).toContain('soiling on QHL-2403');
    expect(text).toContain(`- Ticket ${t.id} (P4, new) at `);
    expect(text).toMatch(/acknowledgement due \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
    expect((await stack.notifications.sweep()).digests).toBe(0);
    expect(digests.every((m) => m.from === 'ops@brightward.example')).toBe(true);
  });
});

describe('assignment and resolution', () => {
  it('mails the crew member when dispatched (with the cautions), shows it in the bell live, and tells the dispatcher of the resolution', async () => {
    const crew = await as(CREW);
    const ws = new WebSocket(`${stack.url.replace('http', 'ws')}/ws`, { headers: { Cookie: crew.cookie } });
    const pushed: LiveServerMessage[] = [];
    ws.on('message', (d) => pushed.push(JSON.parse(String(d))));
    await new Promise((res) => ws.once('open', res));
    const before = ((await crew.agent.get('/api/notifications').expect(200)).body as NotificationList).unread;

    const t = await open('QHL-2404', 'P2', 'Tilt drive noisy');
    expect((await move(TECH, t.id, { to: 'dispatched', assigneeId: crew.userId })).status).toBe(200);
    await settled();
    const [mail, ...more] = mailsAbout(t.id, /assigned to you/);
    expect(more).toEqual([]);
    expect(mail!.to).toEqual([CREW]);
    expect(mail!.subject).toBe(`Ticket ${t.id} (P2) assigned to you: Tilt drive noisy`);
    expect(mail!.text).toContain('Mara Okonjo has sent you to unit QHL-2404 at ');
    expect(mail!.text).toContain('A software hold is not lockout/tagout');
    expect(mail!.text).toContain('The modules are live whenever light falls on them');
    expect(mail!.text).toContain(`Open the ticket: https://ops.brightward.example/tickets/${t.id}`);
    // Nobody else heard of a P2 dispatch.
    expect(sink.messages.filter((m) => m.text.includes(`Ticket ${t.id} `)).map((m) => m.to)).toEqual([[CREW]]);

    const row = await outboxRow(new RegExp(`^Ticket ${t.id} \\(P2\\) assigned`));
    expect(row).toMatchObject({ kind: 'assigned', to: [CREW], status: 'sent', attempts: 1, lastError: null, attachments: [] });
    expect(row!.body).toBe(mail!.text);

    const list = (await crew.agent.get('/api/notifications?unread=true').expect(200)).body as NotificationList;
    expect(list.unread).toBe(before + 1);
    expect(list.items[0]).toMatchObject({ kind: 'assigned', ticketId: t.id, readAt: null });
    const live = await until('the live notification', () =>
      pushed.find((m): m is Extract<LiveServerMessage, { type: 'notification' }> => m.type === 'notification' && m.notification !== null),
    );
    expect(live.notification!.id).toBe(list.items[0]!.id);
    expect(live.unread).toBe(before + 1);
    const read = await crew.agent.post(`/api/notifications/${list.items[0]!.id}/read`).expect(200);
    expect(read.body.readAt).not.toBeNull();
    expect(((await crew.agent.get('/api/notifications').expect(200)).body as NotificationList).unread).toBe(before);
    await until('the unread count pushed after reading', () =>
      pushed.find((m) => m.type === 'notification' && m.notification === null && m.unread === before),
    );
    ws.close();

    await move(CREW, t.id, { to: 'acknowledged' });
    await move(CREW, t.id, { to: 'on-site', confirm: true });
    const closure = { component: 'tilt drive', failureMode: 'grinding', cause: 'dry bearing', action: 'repair' };
    expect((await move(CREW, t.id, { to: 'resolved', confirm: true, note: 'Greased.', closure })).status).toBe(200);
    await settled();
    const resolved = mailsAbout(t.id, /resolved/);
    expect(resolved.map((m) => [m.to, m.subject])).toEqual([[[TECH], `Ticket ${t.id} resolved: Tilt drive noisy`]]);
    expect(resolved[0]!.text).toContain('Closure: tilt drive; grinding; cause: dry bearing; action: repair.');
  });
});

describe('a P1 alarm', () => {
  it('pages the people on call at once and, unacknowledged after 15 min, every technician of the site, once', async () => {
    const tech = await as(TECH);
    // A third technician who looks after another site only.
    const admin = await as(ADMIN);
    await admin.agent
      .post('/api/users')
      .send({ email: TECH3, name: 'Saoirse Lund', role: 'technician', password: 'long-enough-pw' })
      .expect(201);
    const tech3 = await as(TECH3, 'long-enough-pw');
    await tech3.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: [siteIdOf('NKR-2401')], severities: ['P1', 'P2', 'P3', 'P4'], email: true, dashboard: true })
      .expect(200);
    const hour = 3600_000;
    const rota = await tech.agent
      .put('/api/on-call')
      .send({
        entries: [
          { userId: tech.userId, siteId: null, from: new Date(now() - hour).toISOString(), to: new Date(now() + 8 * hour).toISOString() },
          {
            userId: (await as(TECH2)).userId,
            siteId: null,
            from: new Date(now() + 8 * hour).toISOString(),
            to: new Date(now() + 16 * hour).toISOString(),
          },
        ],
      })
      .expect(200);
    expect(rota.body.now.map((e: { userName: string }) => e.userName)).toEqual(['Mara Okonjo']);
    expect(rota.body.entries).toHaveLength(2);
    // Who may be put on call: staff, never owners.
    expect(rota.body.candidates.map((p: { role: string }) => p.role).sort()).toEqual([
      'admin',
      'crew',
      'crew',
      'engineer',
      'technician',
      'technician',
      'technician',
    ]);

    await raise('FSC-2401', 'stall', 'P1');
    const [t] = (await tech.agent.get(`/api/tickets?unitId=${unitId('FSC-2401')}`).expect(200)).body as TicketView[];
    await settled();
    const page = mailsAbout(t!.id, /^P1 at /);
    expect(page.map((m) => m.to)).toEqual([[TECH]]);
    expect(page[0]!.text).toContain(
      'You are on call. If nobody acknowledges the ticket within 15 minutes, every technician of the site is told.',
    );
    expect(page[0]!.text).toContain('A software hold is not lockout/tagout');

    clockOffsetMs = 14 * 60_000;
    expect((await stack.notifications.sweep()).escalated).toBe(0);
    clockOffsetMs = 16 * 60_000;
    expect((await stack.notifications.sweep()).escalated).toBe(1);
    await settled();
    const esc = mailsAbout(t!.id, /^P1 not acknowledged after 15 min/);
    expect(esc.map((m) => m.to[0]).sort()).toEqual([TECH, TECH2]); // not tech3: another site
    expect(esc[0]!.subject).toBe(`P1 not acknowledged after 15 min at ${t!.siteName}: FSC-2401: stall on FSC-2401`);
    expect(esc[0]!.text).toContain('Every technician of the site gets this.');
    clockOffsetMs = 20 * 60_000;
    expect((await stack.notifications.sweep()).escalated).toBe(0);
    await settled();
    expect(mailsAbout(t!.id, /^P1 not acknowledged/)).toHaveLength(2);
    expect(await stack.db('ticket_notices').where({ ticket_id: t!.id }).orderBy('notice').pluck('notice')).toEqual([
      'escalation',
      'p1-page',
    ]);
    clockOffsetMs = 0;
  });
});

describe('SLA breaches', () => {
  it('tell the dispatcher and the technicians of the site once per clock, however often the sweep runs', async () => {
    const crew = await as(CREW);
    const t = await open('NKR-2402', 'P1', 'Unit will not stow');
    await move(TECH2, t.id, { to: 'dispatched', assigneeId: crew.userId });
    clockOffsetMs = 25 * 60_000;
    await stack.notifications.sweep();
    await settled();
    expect(mailsAbout(t.id, /^SLA breached/)).toHaveLength(0);
    clockOffsetMs = 31 * 60_000; // P1: acknowledge within 30 min
    await stack.notifications.sweep();
    await stack.notifications.sweep();
    await settled();
    clockOffsetMs = 40 * 60_000;
    await stack.notifications.sweep();
    await settled();
    const breach = mailsAbout(t.id, /^SLA breached/);
    // The dispatcher (tech2), tech1 (every site) and tech3 (this site only), once each.
    expect(breach.map((m) => m.to[0]).sort()).toEqual([TECH, TECH3, TECH2].sort());
    expect(breach[0]!.subject).toBe(`SLA breached, ticket ${t.id} (P1): acknowledgement overdue`);
    expect(await stack.db('ticket_notices').where({ ticket_id: t.id }).pluck('notice')).toEqual(['breach-acknowledge']);
    clockOffsetMs = 0;
    // No owner has had a single message of any kind.
    expect(sink.messages.filter((m) => m.to.some((a) => OWNERS.includes(a)))).toEqual([]);
  });
});

describe('the past', () => {
  it('is never paged: a P1 ticket and a breach more than a day old are marked dealt with, and nobody is told', async () => {
    const u = stack.units.get('QED-2404')!;
    const long = new Date(now() - 3 * 86_400_000);
    const [id] = await stack.db('tickets').insert({
      site_id: u.siteId,
      unit_id: u.id,
      kind: 'stall',
      severity: 'P1',
      title: 'Restored from long ago',
      state: 'new',
      opened_at: long,
      acknowledge_due_at: new Date(long.getTime() + 30 * 60_000),
      on_site_due_at: new Date(long.getTime() + 4 * 3600_000),
      fix_due_at: new Date(long.getTime() + 24 * 3600_000),
      availability_category: 'forced-outage',
      parts: '[]',
    });
    // It was paged back then.
    await stack.db('ticket_notices').insert({ ticket_id: id, notice: 'p1-page', at: long });
    const before = sink.messages.length;
    await stack.notifications.sweep();
    await settled();
    expect(sink.messages.slice(before).filter((m) => m.text.includes(`Ticket ${id} `))).toEqual([]);
    expect(await stack.db('ticket_notices').where({ ticket_id: id }).orderBy('notice').pluck('notice')).toEqual([
      'breach-acknowledge',
      'breach-fix',
      'breach-onSite',
      'escalation',
      'p1-page',
    ]);
  });
});

describe('a failing mail server', () => {
  it('keeps the request that caused a mail successful, tries again and records failed with the error', async () => {
    const crew = await as(CREW);
    sink.refuse('Mailbox busy, try later');
    const t = await open('QHL-2405', 'P3', 'Mail will fail');
    const d = await move(TECH, t.id, { to: 'dispatched', assigneeId: crew.userId });
    expect(d.status).toBe(200);
    expect(d.body.state).toBe('dispatched');
    const failed = await until('the outbox row marked failed', async () => {
      const row = await outboxRow(new RegExp(`^Ticket ${t.id} \\(P3\\)`));
      return row?.status === 'failed' ? row : undefined;
    });
    expect(failed.attempts).toBe(3);
    expect(failed.lastError).toMatch(/Mailbox busy, try later/);
    // The dashboard notification went regardless.
    expect(((await crew.agent.get('/api/notifications').expect(200)).body as NotificationList).items[0]).toMatchObject({ ticketId: t.id });

    // A server that comes back in time: the second try goes through.
    const t2 = await open('QHL-2406', 'P3', 'Mail will be late');
    await move(TECH, t2.id, { to: 'dispatched', assigneeId: crew.userId });
    await until('the first failed try', async () =>
      (await outboxRow(new RegExp(`^Ticket ${t2.id} `)))?.attempts === 1 ? true : undefined,
    );
    sink.refuse(null);
    const sent = await until('the outbox row marked sent', async () => {
      const row = await outboxRow(new RegExp(`^Ticket ${t2.id} `));
      return row?.status === 'sent' ? row : undefined;
    });
    expect(sent.attempts).toBe(2);
    expect(mailsAbout(t2.id, /assigned to you/)).toHaveLength(1);
  });
});

describe('mail left queued by a restart', () => {
  it('goes out when the mail service starts again; one with attachments is marked failed, saying why', async () => {
    const at = new Date();
    const row = (subject: string, attachments: string[]) => ({
      kind: 'statement',
      to_addresses: 'accounts@quillmoor.example',
      subject,
      body: 'Your statement.',
      attachments: JSON.stringify(attachments),
      status: 'queued',
      attempts: 1,
      last_error: 'Connection refused',
      created_at: at,
    });
    const [plain] = await stack.db('mail_outbox').insert(row('Left queued, plain', []));
    const [withFile] = await stack.db('mail_outbox').insert(row('Left queued, with a file', ['statement-2026-11.pdf']));
    const cfg = loadConfig({ BW_SMTP_PORT: String(sink.port) }).mail;
    const restarted = new MailService(new MailOutboxRepository(stack.db), smtpTransport(cfg), pino({ level: 'silent' }), { attempts: 3 });
    await restarted.resume();
    await restarted.settle();
    restarted.stop();
    const after = await stack
      .db('mail_outbox')
      .whereIn('id', [plain!, withFile!] as number[])
      .orderBy('id')
      .select('status', 'attempts', 'last_error');
    expect(after[0]).toMatchObject({ status: 'sent', attempts: 2 });
    expect(after[1]).toMatchObject({ status: 'failed', attempts: 2 });
    expect(after[1].last_error).toMatch(/restarted before this message went out; its attachments were not kept/);
    expect(sink.messages.filter((m) => m.subject.startsWith('Left queued')).map((m) => [m.to, m.subject, m.text])).toEqual([
      [['accounts@quillmoor.example'], 'Left queued, plain', 'Your statement.'],
    ]);
  });
});

describe('notification settings', () => {
  it('start from the defaults, are validated, and stay within what the person may see', async () => {
    const crew = await as(CREW);
    expect((await crew.agent.get('/api/me/notification-settings').expect(200)).body).toEqual({
      siteIds: null,
      severities: ['P1', 'P2', 'P3', 'P4'],
      email: true,
      dashboard: true,
    });
    const none = await crew.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: null, severities: [], email: true, dashboard: true });
    expect(none.status).toBe(400);
    expect(none.body.error.fields.severities).toMatch(/at least one severity/);
    const bad = await crew.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: [999999], severities: ['P5'], email: 'yes', dashboard: true });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['email', 'severities.0']);
    const unknown = await crew.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: [999999], severities: ['P1'], email: true, dashboard: true });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.fields.siteIds).toBe('Not a site you may see: 999999.');
    const ok = await crew.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: [siteIdOf('QHL-2401'), siteIdOf('QHL-2401')], severities: ['P2', 'P1'], email: false, dashboard: true });
    expect(ok.body).toEqual({ siteIds: [siteIdOf('QHL-2401')], severities: ['P1', 'P2'], email: false, dashboard: true });
    expect((await crew.agent.get('/api/me/notification-settings').expect(200)).body).toEqual(ok.body);
    await crew.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: null, severities: ['P1', 'P2', 'P3', 'P4'], email: true, dashboard: true })
      .expect(200);
  });

  it('keep owners to their own sites and their own notifications; the rota is not theirs', async () => {
    const owner = await as(OWNER);
    const other = await stack
      .db('sites')
      .join('owners', 'owners.id', 'sites.owner_id')
      .where('owners.name', 'Fenwick Lane Schools Trust')
      .first('sites.id');
    const own = siteIdOf('QHL-2401');
    const r = await owner.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: [own, other.id], severities: ['P1'], email: true, dashboard: true });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.siteIds).toBe(`Not a site you may see: ${other.id}.`);
    await owner.agent
      .put('/api/me/notification-settings')
      .send({ siteIds: [own], severities: ['P1'], email: true, dashboard: true })
      .expect(200);
    const crewsOwn = ((await (await as(CREW)).agent.get('/api/notifications').expect(200)).body as NotificationList).items[0]!;
    await owner.agent.post(`/api/notifications/${crewsOwn.id}/read`).expect(404);
    expect((await owner.agent.get('/api/notifications').expect(200)).body).toEqual({ unread: 0, items: [] });
    await owner.agent.get('/api/on-call').expect(403);
    await (await as(CREW)).agent.put('/api/on-call').send({ entries: [] }).expect(403);
    await owner.agent.get('/api/mail/outbox').expect(403);
  });

  it('checks the rota: real, enabled staff, real sites, from before to', async () => {
    const tech = await as(TECH);
    const owner = await as(OWNER);
    const r = await tech.agent.put('/api/on-call').send({
      entries: [
        { userId: owner.userId, siteId: null, from: '2026-12-03T08:00:00Z', to: '2026-12-03T16:00:00Z' },
        { userId: tech.userId, siteId: 999999, from: '2026-12-03T16:00:00Z', to: '2026-12-03T08:00:00Z' },
      ],
    });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toEqual({
      'entries.0.userId': 'Only technician, crew, engineer, admin may be on call, not owner.',
      'entries.1.siteId': 'No such site: 999999.',
      'entries.1.to': 'Must be after from.',
    });
    const noOffset = await tech.agent
      .put('/api/on-call')
      .send({ entries: [{ userId: tech.userId, siteId: null, from: '2026-12-03 08:00', to: '2026-12-03T16:00:00Z' }] });
    expect(noOffset.status).toBe(400);
    expect(noOffset.body.error.fields['entries.0.from']).toMatch(/ISO 8601/);
  });
});

describe('mail configuration', () => {
  it('refuses a bad BW_SMTP_PORT, naming it', () => {
    expect(() => loadConfig({ BW_SMTP_PORT: 'twenty-five' })).toThrow(ConfigError);
    expect(() => loadConfig({ BW_SMTP_PORT: '70000' })).toThrow(/BW_SMTP_PORT: a TCP port, a whole number from 1 to 65535/);
    expect(() => loadConfig({ BW_SMTP_USER: 'ops' })).toThrow(/BW_SMTP_USER and BW_SMTP_PASSWORD: give both or neither/);
    expect(() => loadConfig({ BW_SMTP_FROM: 'not an address' })).toThrow(/BW_SMTP_FROM/);
    expect(loadConfig({ BW_SMTP_PORT: '587', BW_SMTP_SECURE: 'false', BW_SMTP_USER: 'ops', BW_SMTP_PASSWORD: 'pw' }).mail).toMatchObject({
      port: 587,
      secure: false,
      auth: { user: 'ops', pass: 'pw' },
    });
  });
});
