/**
 * The access matrix: every route the server registers, asked by every role about its own owner's resources and about
 * another owner's, against a hand-written table of the statuses the product's rules give. The table is written from the
 * rules (README "Sessions"), never from the code's role lists, and a route registered without a row fails the test.
 * The same for the live socket's subscriptions.
 *
 * To add a route: add a row to ROUTES (the first failure prints a row to start from):
 *   row('METHOD /path/as/:registered', request, anonymous, admin, engineer, technician, crew, owner, options?)
 * - `request` is `(w) => path`, `(w) => ({ path, body })` or `(w) => ({ path, attach })` (a multipart upload) when the request is the same for both sides, or
 *   `(w, s) => …` to ask about `w[s]`, where `s` is 'own' or 'other'. `w.own` and `w.other` hold each owner's ownerId,
 *   siteId, unitIds (six units of that site), alarmId (an open alarm on unitIds[0]) and survey; a row that changes a
 *   unit takes an index of its own (`unit(w, s, 6)` needs a seventh unit, so reuse 1–5 with care).
 * - each status cell is a number for both owners' resources, or `mine(s)` = s for the caller's own owner's resource and
 *   404 for another owner's, or `[own, other]` spelled out. "own" is Quillmoor Energy Cooperative (the demo owner
 *   user's), "other" is Fenwick Lane Schools Trust; staff have no owner, so for them the two sides are two owners.
 * - options: `{ label }` for a second row of the same route (another body), `{ fresh: true }` when the request ends or
 *   changes the caller's session (sign-out, a password change): it then runs on a session of its own, and
 *   `{ optional: true }` for a route only some set-ups register.
 * Requests run six at a time in any order, so a row must not depend on another row's effect.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Express } from 'express';
import WebSocket from 'ws';
import sharp from 'sharp';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD, DEMO_USERS } from '../../seeds/demo-world';
import type { LiveServerMessage } from '../../shared/contracts/live';

const WHO = ['anonymous', 'admin', 'engineer', 'technician', 'crew', 'owner'] as const;
type Who = (typeof WHO)[number];
type Role = Exclude<Who, 'anonymous'>;
const SIDES = ['own', 'other'] as const;
type Side = (typeof SIDES)[number];
type Cell = number | readonly [own: number, other: number];

/** What the demo world holds for one owner (ids looked up once the stack is seeded). */
interface OwnerWorld {
  ownerId: number;
  siteId: number;
  /** Units of that site, by id; rows that change a unit use their own index so they never meet. */
  unitIds: number[];
  alarmId: number;
  ticketId: number;
  /** A photo of that ticket. */
  fileId: number;
  survey: unknown;
}
type World = Record<Side, OwnerWorld>;
/** A file sent as multipart/form-data in the field `file`. */
interface Attachment { bytes: Buffer; filename: string; contentType: string }
type Req = string | { path: string; body: unknown } | { path: string; attach: Attachment };

interface Row {
  /** Method and path exactly as registered, e.g. `GET /api/sites/:id`. */
  route: string;
  /** Tells two rows of one route apart (e.g. two command kinds). */
  label?: string;
  /** The request for one side; a function of one argument asks the same for both sides. */
  send: ((w: World) => Req) | ((w: World, side: Side) => Req);
  expect: Record<Who, Cell>;
  /** Runs on a session of its own (the request ends or changes the session). */
  fresh?: boolean;
  /** Only registered in some set-ups (the built dashboard's fallback). */
  optional?: boolean;
}

const mine = (status: number): Cell => [status, 404];
let photoBytes: Buffer;
const photo = (): Attachment => ({ bytes: photoBytes, filename: 'matrix.png', contentType: 'image/png' });
let serial = 0;
const unique = () => `${process.pid}-${++serial}`;

function row(route: string, send: Row['send'], anonymous: Cell, admin: Cell, engineer: Cell, technician: Cell, crew: Cell, owner: Cell, more: Partial<Row> = {}): Row {
  return { route, send, expect: { anonymous, admin, engineer, technician, crew, owner }, ...more };
}

const HOUR = '2026-06-10T08:00:00Z';
const range = 'from=2026-06-10T08:00:00Z&to=2026-06-10T09:00:00Z';
const unit = (w: World, s: Side, i = 0) => w[s].unitIds[i]!;

// prettier-ignore
const ROUTES: Row[] = [
  //  route                                        request                                                                              anon admin  eng  tech crew  owner
  row('GET /api/health',                           () => '/api/health',                                                                   200, 200, 200, 200, 200, 200),
  row('POST /api/auth/sign-in',                    () => ({ path: '/api/auth/sign-in', body: { email: 'crew2@saltmarsh.example', password: DEMO_PASSWORD } }),
                                                                                                                                          200, 200, 200, 200, 200, 200),
  row('POST /api/auth/sign-out',                   () => ({ path: '/api/auth/sign-out', body: {} }),                                      204, 204, 204, 204, 204, 204, { fresh: true }),
  row('GET /api/me',                               () => '/api/me',                                                                       401, 200, 200, 200, 200, 200),
  // A wrong current password: every signed-in role may ask (400 on currentPassword), and nobody's password changes.
  row('POST /api/me/password',                     () => ({ path: '/api/me/password', body: { currentPassword: 'not-the-password', newPassword: 'a-new-long-password' } }), 401, 400, 400, 400, 400, 400, { fresh: true }),

  // People and owners: admins only.
  row('GET /api/users',                            () => '/api/users',                                                                    401, 200, 403, 403, 403, 403),
  row('POST /api/users',                           () => ({ path: '/api/users', body: { email: `m${unique()}@saltmarsh.example`, name: 'Matrix Person', role: 'technician', password: 'long-enough-pw' } }),
                                                                                                                                          401, 201, 403, 403, 403, 403),
  row('PATCH /api/users/:id',                      () => ({ path: `/api/users/${userId('tech2@saltmarsh.example')}`, body: { name: 'Tomasz Velde' } }),
                                                                                                                                          401, 200, 403, 403, 403, 403),
  row('POST /api/users/:id/password',              () => ({ path: `/api/users/${userId('tech2@saltmarsh.example')}/password`, body: { password: DEMO_PASSWORD } }),
                                                                                                                                          401, 204, 403, 403, 403, 403),
  row('GET /api/owners',                           () => '/api/owners',                                                                   401, 200, 403, 403, 403, 403),
  row('POST /api/owners',                          () => ({ path: '/api/owners', body: { name: `Matrix Owner ${unique()}` } }),          401, 201, 403, 403, 403, 403),
  row('PATCH /api/owners/:id',                     (w, s) => ({ path: `/api/owners/${w[s].ownerId}`, body: {} }),                         401, 200, 403, 403, 403, 403),

  // Sites and units: everyone reads what is in scope (owners their own; another owner's is 404); admins write.
  row('GET /api/sites',                            () => '/api/sites',                                                                    401, 200, 200, 200, 200, 200),
  row('GET /api/sites/:id',                        (w, s) => `/api/sites/${w[s].siteId}`,                                                401, 200, 200, 200, 200, mine(200)),
  row('POST /api/sites',                           (w, s) => ({ path: '/api/sites', body: { ownerId: w[s].ownerId, name: `Matrix Site ${unique()}`, latitudeDeg: 50, longitudeDeg: 8, elevationM: 100, timeZone: 'Europe/Berlin', albedo: 0.2 } }),
                                                                                                                                          401, 201, 403, 403, 403, 403),
  row('PATCH /api/sites/:id',                      (w, s) => ({ path: `/api/sites/${w[s].siteId}`, body: {} }),                           401, 200, 403, 403, 403, 403),
  row('GET /api/units',                            (w, s) => `/api/units?siteId=${w[s].siteId}`,                                          401, 200, 200, 200, 200, 200),
  row('GET /api/units/:id',                        (w, s) => `/api/units/${unit(w, s)}`,                                                  401, 200, 200, 200, 200, mine(200)),
  row('POST /api/units',                           (w, s) => ({ path: '/api/units', body: { serial: `MX-${unique()}`, siteId: w[s].siteId, ratedPowerWp: 400, detectorTiltDeg: 20, tiltMinDeg: 0, tiltMaxDeg: 85, azimuthMinDeg: 0, azimuthMaxDeg: 360, planXM: 0, planYM: 0, firmware: '2.4.1' } }),
                                                                                                                                          401, 201, 403, 403, 403, 403),
  row('PATCH /api/units/:id',                      (w, s) => ({ path: `/api/units/${unit(w, s, 4)}`, body: {} }),                         401, 200, 403, 403, 403, 403),
  row('POST /api/units/:id/secret',                (w, s) => ({ path: `/api/units/${unit(w, s, 3)}/secret`, body: {} }),                  401, 200, 403, 403, 403, 403),

  // Live state, telemetry, commands. The unit page reads these: owners too, read-only, for their own sites' units
  // (the last hour is `telemetry`); another owner's unit is 404 to them.
  row('GET /api/units/:id/state',                  (w, s) => `/api/units/${unit(w, s)}/state`,                                            401, 200, 200, 200, 200, mine(200)),
  row('GET /api/units/:id/telemetry',              (w, s) => `/api/units/${unit(w, s)}/telemetry?${range}`,                               401, 200, 200, 200, 200, mine(200)),
  row('GET /api/units/:id/holds',                  (w, s) => `/api/units/${unit(w, s)}/holds`,                                            401, 200, 200, 200, 200, mine(200)),
  row('GET /api/units/:id/commands',               (w, s) => `/api/units/${unit(w, s)}/commands`,                                         401, 200, 200, 200, 200, mine(200)),
  row('POST /api/units/:id/commands',              (w, s) => ({ path: `/api/units/${unit(w, s, 1)}/commands`, body: { kind: 'configure', config: { reportIntervalS: 5 }, confirm: true } }),
                                                                                                                                          401, 201, 201, 201, 403, 403, { label: 'configure' }),
  row('POST /api/units/:id/commands',              (w, s) => ({ path: `/api/units/${unit(w, s, 2)}/commands`, body: { kind: 'hold' } }),  401, 201, 201, 201, 201, 403, { label: 'hold' }),
  row('GET /api/metrics',                          () => '/api/metrics',                                                                  401, 200, 200, 200, 403, 403),

  // Site survey: read in scope, edited by engineers and admins.
  row('GET /api/sites/:id/survey',                 (w, s) => `/api/sites/${w[s].siteId}/survey`,                                         401, 200, 200, 200, 200, mine(200)),
  row('PUT /api/sites/:id/survey',                 (w, s) => ({ path: `/api/sites/${w[s].siteId}/survey`, body: w[s].survey }),           401, 200, 200, 403, 403, 403),

  // Survey revisions: never shown to owners (404, their own site too) or crews (403); technicians read; engineers and
  // admins propose (this world has one three-sample scan per site: 422, too few scans) and decide (no such revision: 404).
  row('GET /api/sites/:id/survey-revisions',       (w, s) => `/api/sites/${w[s].siteId}/survey-revisions`,                               401, 200, 200, 200, 403, 404),
  row('GET /api/sites/:id/survey-revisions/:revisionId', (w, s) => `/api/sites/${w[s].siteId}/survey-revisions/999999`,                  401, 404, 404, 404, 403, 404),
  row('POST /api/sites/:id/survey-revisions/propose', (w, s) => ({ path: `/api/sites/${w[s].siteId}/survey-revisions/propose`, body: {} }), 401, 422, 422, 403, 403, 404),
  row('POST /api/sites/:id/survey-revisions/:revisionId/accept', (w, s) => ({ path: `/api/sites/${w[s].siteId}/survey-revisions/999999/accept`, body: { reason: 'matrix' } }),
                                                                                                                                          401, 404, 404, 403, 403, 404),
  row('POST /api/sites/:id/survey-revisions/:revisionId/reject', (w, s) => ({ path: `/api/sites/${w[s].siteId}/survey-revisions/999999/reject`, body: { reason: 'matrix' } }),
                                                                                                                                          401, 404, 404, 403, 403, 404),

  // Traces: engineers, technicians, admins.
  row('GET /api/units/:id/traces',                 (w, s) => `/api/units/${unit(w, s)}/traces?${range}&points=10`,                        401, 200, 200, 200, 403, 403),
  row('GET /api/units/:id/traces.csv',             (w, s) => `/api/units/${unit(w, s)}/traces.csv?${range}`,                              401, 200, 200, 200, 403, 403),

  // Landscape: staff; the modelled best (one number) for everyone in scope.
  row('GET /api/sites/:id/landscape',              (w, s) => `/api/sites/${w[s].siteId}/landscape?at=${HOUR}&stepDeg=10&grid=false`,     401, 200, 200, 200, 200, 403),
  row('GET /api/sites/:id/landscape/best',         (w, s) => `/api/sites/${w[s].siteId}/landscape/best?at=${HOUR}`,                      401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/landscape/day',          (w, s) => `/api/sites/${w[s].siteId}/landscape/day?date=2026-12-21`,                  401, 200, 200, 200, 200, 403),
  // The detector tilt a site needs, and sending it to all its units: engineers and admins. Without `confirm` the send
  // is refused (400) after the role check, so the matrix sends nothing.
  row('GET /api/sites/:id/detector-tilt',          (w, s) => `/api/sites/${w[s].siteId}/detector-tilt?year=2026`,                         401, 200, 200, 403, 403, 403),
  row('POST /api/sites/:id/detector-tilt',         (w, s) => ({ path: `/api/sites/${w[s].siteId}/detector-tilt`, body: { detectorTiltDeg: 12 } }),
                                                                                                                                          401, 400, 400, 403, 403, 403),

  // Alarms and health: read in scope; acknowledged by the control room; settings by engineers and admins.
  // Tickets: read in scope; opened by the control room; moved by whoever the lifecycle names (tickets.test.ts has the table).
  row('GET /api/tickets',                          () => '/api/tickets',                                                                  401, 200, 200, 200, 200, 200),
  row('GET /api/tickets.csv',                      () => '/api/tickets.csv',                                                              401, 200, 200, 200, 200, 200),
  row('POST /api/tickets',                         (w, s) => ({ path: '/api/tickets', body: { unitId: unit(w, s, 5), title: 'Matrix', severity: 'P3' } }),
                                                                                                                                          401, 201, 201, 201, 403, 403),
  row('GET /api/tickets/assignees',                () => '/api/tickets/assignees',                                                        401, 200, 200, 200, 403, 403),
  row('GET /api/tickets/:id',                      (w, s) => `/api/tickets/${w[s].ticketId}`,                                            401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/ticket-kpis',            (w, s) => `/api/sites/${w[s].siteId}/ticket-kpis?month=2026-06`,                      401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/statements',             (w, s) => `/api/sites/${w[s].siteId}/statements`,                                     401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/statements/:month',      (w, s) => `/api/sites/${w[s].siteId}/statements/2026-06`,                             401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/statements/:month.csv',  (w, s) => `/api/sites/${w[s].siteId}/statements/2026-06.csv`,                         401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/statements/:month.pdf',  (w, s) => `/api/sites/${w[s].siteId}/statements/2026-06.pdf`,                         401, 200, 200, 200, 200, mine(200)),
  // June 2026 is not locked in this world: engineers and admins reach the service (409) and change nothing.
  row('POST /api/sites/:id/statements/:month/restate', (w, s) => ({ path: `/api/sites/${w[s].siteId}/statements/2026-06/restate`, body: { reason: 'matrix' } }),
                                                                                                                                          401, 409, 409, 403, 403, 403),
  row('GET /api/sites/:id/statement-trend',        (w, s) => `/api/sites/${w[s].siteId}/statement-trend`,                                401, 200, 200, 200, 200, mine(200)),
  row('GET /api/owners/:id/sla',                   (w, s) => `/api/owners/${w[s].ownerId}/sla`,                                          401, 200, 200, 200, 200, mine(200)),
  row('PUT /api/owners/:id/sla',                   (w, s) => ({ path: `/api/owners/${w[s].ownerId}/sla`, body: {} }),                     401, 200, 403, 403, 403, 403),
  // A stale version: the control room reaches the lock (409) and changes nothing; crews may not cancel, owners move nothing.
  row('POST /api/tickets/:id/transition',          (w, s) => ({ path: `/api/tickets/${w[s].ticketId}/transition`, body: { to: 'cancelled', reason: 'matrix', version: 999 } }),
                                                                                                                                          401, 409, 409, 409, 403, 403),
  // Ticket files: read with the ticket; added by the control room, and by the crew member assigned (nobody is, here).
  row('POST /api/tickets/:id/files',               (w, s) => ({ path: `/api/tickets/${w[s].ticketId}/files`, attach: photo() }),         401, 201, 201, 201, 403, 403),
  row('GET /api/tickets/:id/files',                (w, s) => `/api/tickets/${w[s].ticketId}/files`,                                      401, 200, 200, 200, 200, mine(200)),
  row('GET /api/tickets/:id/files/:fileId',        (w, s) => `/api/tickets/${w[s].ticketId}/files/${w[s].fileId}?thumb=1`,               401, 200, 200, 200, 200, mine(200)),
  row('GET /api/alarms',                           (w, s) => `/api/alarms?siteId=${w[s].siteId}`,                                         401, 200, 200, 200, 200, mine(200)),
  row('GET /api/alarms',                           (w, s) => `/api/alarms?unitId=${unit(w, s)}`,                                          401, 200, 200, 200, 200, mine(200), { label: 'one unit (the unit page)' }),
  row('GET /api/alarms/:id',                       (w, s) => `/api/alarms/${w[s].alarmId}`,                                               401, 200, 200, 200, 200, mine(200)),
  row('POST /api/alarms/:id/acknowledge',          (w, s) => ({ path: `/api/alarms/${w[s].alarmId}/acknowledge`, body: {} }),             401, 200, 200, 200, 403, 403),
  row('GET /api/units/:id/scans/latest',           (w, s) => `/api/units/${unit(w, s)}/scans/latest`,                                     401, 200, 200, 200, 200, mine(200)),
  row('GET /api/sites/:id/health-settings',        (w, s) => `/api/sites/${w[s].siteId}/health-settings`,                                401, 200, 200, 200, 200, mine(200)),
  row('PUT /api/sites/:id/health-settings',        (w, s) => ({ path: `/api/sites/${w[s].siteId}/health-settings`, body: { stowGustMs: 17, reason: 'matrix' } }),
                                                                                                                                          401, 200, 200, 403, 403, 403),
  row('GET /api/sites/:id/health-settings/history', (w, s) => `/api/sites/${w[s].siteId}/health-settings/history?limit=5`,               401, 200, 200, 200, 403, 403),
  row('POST /api/detectors/run',                   (w, s) => ({ path: '/api/detectors/run', body: { from: '2026-06-10T08:00:00Z', to: '2026-06-10T08:10:00Z', unitIds: [unit(w, s)] } }),
                                                                                                                                          401, 200, 200, 200, 403, 403),
  // The detectors' run under its old name: a permanent redirect for everyone signed in (the new path checks the role).
  row('POST /api/health/run',                      () => ({ path: '/api/health/run', body: { from: '2026-06-10T08:00:00Z', to: '2026-06-10T08:10:00Z' } }),
                                                                                                                                          401, 308, 308, 308, 308, 308),

  // Mail and notifications: the outbox is admins'; everyone has their own notifications and settings (owners choose among
  // their own sites only: another owner's site is refused as unknown); the on-call rota is the control room's.
  row('GET /api/mail/outbox',                      () => '/api/mail/outbox?limit=5',                                                      401, 200, 403, 403, 403, 403),
  row('GET /api/me/notification-settings',         () => '/api/me/notification-settings',                                                 401, 200, 200, 200, 200, 200),
  row('PUT /api/me/notification-settings',         (w, s) => ({ path: '/api/me/notification-settings', body: { siteIds: [w[s].siteId], severities: ['P1'], email: true, dashboard: true } }),
                                                                                                                                          401, 200, 200, 200, 200, [200, 400]),
  row('GET /api/notifications',                    () => '/api/notifications',                                                            401, 200, 200, 200, 200, 200),
  row('POST /api/notifications/:id/read',          () => ({ path: '/api/notifications/999999/read', body: {} }),                          401, 404, 404, 404, 404, 404),
  row('GET /api/on-call',                          () => '/api/on-call',                                                                  401, 200, 200, 200, 403, 403),
  row('PUT /api/on-call',                          () => ({ path: '/api/on-call', body: { entries: [] } }),                               401, 200, 200, 200, 403, 403),

  // The audit log: admins only.
  row('GET /api/audit',                            () => '/api/audit?limit=5',                                                            401, 200, 403, 403, 403, 403),

  // Progress of the demo's generated past: admins only.
  row('GET /api/demo-history',                     () => '/api/demo-history',                                                             401, 200, 403, 403, 403, 403),

  // The built dashboard (when present): the page shell for any path; the API behind it decides.
  row('GET /{*splat}',                             () => '/fleet',                                                                        200, 200, 200, 200, 200, 200, { optional: true }),
];

// ---- the stack, its sessions and the demo world

let stack: Awaited<ReturnType<typeof startTestStack>>;
let world: World;
const tokens = new Map<Role, string>();
const userIds = new Map<string, number>();
const userId = (email: string) => userIds.get(email) ?? -1;
const emailOf = (role: Role) => DEMO_USERS.find((u) => u.role === role)!.email;

async function signIn(role: Role): Promise<string> {
  const res = await request(stack.http).post('/api/auth/sign-in').set('Origin', stack.url).send({ email: emailOf(role), password: DEMO_PASSWORD }).expect(200);
  const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('bw_session='));
  return decodeURIComponent(cookie!.split(';')[0]!.slice('bw_session='.length));
}

async function ownerWorld(ownerName: string): Promise<OwnerWorld> {
  const owner = await stack.db('owners').where({ name: ownerName }).first('id');
  const site = await stack.db('sites').where({ owner_id: owner.id }).orderBy('id').first('id');
  const unitIds = (await stack.db('units').where({ site_id: site.id }).orderBy('id').select('id')).map((u) => u.id as number);
  const at = new Date('2026-06-10T08:30:00Z');
  const [alarmId] = await stack.db('alarms').insert({ unit_id: unitIds[0], site_id: site.id, kind: 'stall', severity: 'P3', state: 'active', message: 'Tilt drive stalled.', advice: 'Check the drive.', evidence: '{}', first_seen_at: at, raised_at: at, last_seen_at: at });
  const scan = (kind: string, samples?: number[][]) => ({ unit_id: unitIds[0], ts: at, kind, body: JSON.stringify({ v: 1, ts: at.toISOString(), kind, commandId: `matrix-${site.id}`, ...(samples ? { samples } : {}) }) });
  await stack.db('unit_events').insert([scan('scan-samples', [[30, 180, 700], [40, 180, 750], [50, 180, 720]]), { ...scan('scan-complete'), ts: new Date(at.getTime() + 1000) }]);
  const row = await stack.db('sites').where({ id: site.id }).first('survey');
  const survey = typeof row.survey === 'string' ? JSON.parse(row.survey) : row.survey;
  const due = new Date(at.getTime() + 3600_000);
  const [ticketId] = await stack.db('tickets').insert({ site_id: site.id, unit_id: unitIds[0], kind: 'stall', severity: 'P3', title: 'Matrix ticket', state: 'new', opened_at: at, acknowledge_due_at: due, on_site_due_at: due, fix_due_at: due, availability_category: 'forced-outage', parts: '[]' });
  return { ownerId: owner.id, siteId: site.id, unitIds, alarmId: alarmId as number, ticketId: ticketId as number, fileId: 0, survey };
}

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  for (const u of await stack.db('users').select('id', 'email')) userIds.set(u.email, u.id);
  world = { own: await ownerWorld('Quillmoor Energy Cooperative'), other: await ownerWorld('Fenwick Lane Schools Trust') };
  const own = await stack.db('users').where({ email: emailOf('owner') }).first('owner_id');
  if (own.owner_id !== world.own.ownerId) throw new Error('The owner user is expected to belong to Quillmoor Energy Cooperative.');
  for (const role of WHO) if (role !== 'anonymous') tokens.set(role, await signIn(role));
  photoBytes = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#4a7' } }).png().toBuffer();
  for (const side of SIDES) {
    const res = await request(stack.http).post(`/api/tickets/${world[side].ticketId}/files`).set('Origin', stack.url)
      .set('Cookie', `bw_session=${encodeURIComponent(tokens.get('admin')!)}`).attach('file', photoBytes, { filename: 'matrix.png', contentType: 'image/png' }).expect(201);
    world[side].fileId = res.body.id;
  }
});
afterAll(async () => { await stack?.stop(); });

// ---- the routes the router itself holds

interface LayerLike {
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: LayerLike[] };
  rawPath?: unknown;
}

/** `METHOD /path` of every route reachable from a router stack, mounted paths joined. */
function registeredRoutes(layers: LayerLike[], prefix = ''): string[] {
  const out: string[] = [];
  for (const layer of layers) {
    if (layer.route) {
      for (const path of ([] as string[]).concat(layer.route.path)) {
        for (const [method, on] of Object.entries(layer.route.methods)) if (on && method !== '_all') out.push(`${method.toUpperCase()} ${prefix}${path}`);
      }
    } else if (Array.isArray(layer.handle?.stack)) {
      if (typeof layer.rawPath !== 'string') throw new Error(`A router is mounted on a path the test cannot read: ${String(layer.rawPath)}`);
      out.push(...registeredRoutes(layer.handle.stack, prefix + (layer.rawPath === '/' ? '' : layer.rawPath)));
    }
  }
  return out;
}

const appOf = () => stack.http.listeners('request')[0] as unknown as Express & { router: { stack: LayerLike[] } };

// ---- asking every cell

type Grid = Record<Who, readonly [own: number, other: number]>;
const gridOf = (r: Row): Grid => Object.fromEntries(WHO.map((w) => {
  const c = r.expect[w];
  return [w, typeof c === 'number' ? [c, c] : c];
})) as Grid;

async function ask(r: Row, who: Who, side: Side): Promise<{ status: number; body: unknown }> {
  const method = r.route.split(' ')[0]!;
  const sent = r.send(world, side);
  const { path, body, attach } = typeof sent === 'string' ? { path: sent, body: undefined, attach: undefined } : { body: undefined, attach: undefined, ...sent };
  let token: string | undefined;
  if (who !== 'anonymous') token = r.fresh ? await signIn(who) : tokens.get(who);
  const agent = request(stack.http);
  const m = method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
  let req = agent[m](path).set('Origin', stack.url);
  if (token) req = req.set('Cookie', `bw_session=${encodeURIComponent(token)}`);
  const res = attach ? await req.attach('file', attach.bytes, { filename: attach.filename, contentType: attach.contentType }) : body === undefined ? await req : await req.send(body as object);
  return { status: res.status, body: res.body };
}

/** Runs tasks with at most `n` at a time. */
async function pool<T>(tasks: (() => Promise<T>)[], n: number): Promise<T[]> {
  const out: T[] = new Array(tasks.length);
  let next = 0;
  await Promise.all(Array.from({ length: n }, async () => {
    while (next < tasks.length) {
      const i = next++;
      out[i] = await tasks[i]!();
    }
  }));
  return out;
}

const keyOf = (r: Row) => (r.label ? `${r.route} (${r.label})` : r.route);

describe('access matrix over HTTP', () => {
  let registered: string[] = [];
  const actual = new Map<string, Grid>();
  const badErrorBodies: string[] = [];

  beforeAll(async () => {
    registered = registeredRoutes(appOf().router.stack);
    const rows = ROUTES.filter((r) => registered.includes(r.route));
    const cells = rows.flatMap((r) => WHO.flatMap((who) => (r.send.length < 2 ? (['own'] as const) : SIDES).map((side) => ({ r, who, side }))));
    const results = await pool(cells.map((c) => () => ask(c.r, c.who, c.side)), 6);
    for (const r of rows) actual.set(keyOf(r), Object.fromEntries(WHO.map((w) => [w, [0, 0]])) as unknown as Grid);
    cells.forEach((c, i) => {
      const { status, body } = results[i]!;
      const g = actual.get(keyOf(c.r))! as Record<Who, [number, number]>;
      if (c.r.send.length < 2) g[c.who] = [status, status];
      else g[c.who][c.side === 'own' ? 0 : 1] = status;
      const error = (body as { error?: { code?: unknown; message?: unknown } } | null)?.error;
      const api = c.r.route.includes(' /api/');
      if (api && status >= 400 && (typeof error?.code !== 'string' || typeof error.message !== 'string')) {
        badErrorBodies.push(`${keyOf(c.r)} as ${c.who} (${c.side}) → ${status} ${JSON.stringify(body).slice(0, 80)}`);
      }
    });
  }, 120_000);

  it('has a row for every route the router holds, and no row for a route that is gone', () => {
    const table = new Set(ROUTES.map((r) => r.route));
    const missing = registered.filter((r) => !table.has(r));
    const template = (r: string) => `  row('${r}', (w, s) => '…', 401, 200, 200, 200, 200, mine(200)),`;
    expect(missing, `Routes without a row in ROUTES; add one per route, e.g.\n${missing.map(template).join('\n')}\n`).toEqual([]);
    const gone = ROUTES.filter((r) => !r.optional && !registered.includes(r.route)).map((r) => r.route);
    expect(gone, 'Rows for routes the server no longer registers').toEqual([]);
    expect(registered.length).toBeGreaterThan(30);
  });

  for (const r of ROUTES) {
    it(`${keyOf(r)}: ${WHO.map((w) => `${w} ${JSON.stringify(r.expect[w])}`).join(', ')}`, (ctx) => {
      if (!actual.has(keyOf(r))) {
        if (r.optional) return ctx.skip();
        throw new Error(`${r.route} is not registered`);
      }
      expect(actual.get(keyOf(r))).toEqual(gridOf(r));
    });
  }

  it('answers every refusal in the one error shape { error: { code, message } }', () => {
    expect(badErrorBodies).toEqual([]);
  });

  it('answers an unknown API path 401 to anonymous callers and 404 to everyone signed in', async () => {
    const unknown = { route: 'GET /api/no-such-thing', send: () => '/api/no-such-thing', expect: {} as Record<Who, Cell> } satisfies Row;
    const statuses = await Promise.all(WHO.map(async (w) => (await ask(unknown, w, 'own')).status));
    expect(statuses).toEqual([401, 404, 404, 404, 404, 404]);
  });
});

// ---- the live socket

/** What a role gets for each subscription: `401` (no socket at all), the owners whose units it carries, or per side. */
type SocketCell = 401 | 'both' | 'own' | readonly [own: 'snapshot' | 'not_found', other: 'snapshot' | 'not_found'];
// prettier-ignore
const SOCKET: Record<'fleet' | 'site' | 'unit', Record<Who, SocketCell>> = {
  //            anonymous       admin                      engineer                   technician                 crew                       owner
  fleet: { anonymous: 401, admin: 'both',                 engineer: 'both',          technician: 'both',        crew: 'both',              owner: 'own' },
  site:  { anonymous: 401, admin: ['snapshot', 'snapshot'], engineer: ['snapshot', 'snapshot'], technician: ['snapshot', 'snapshot'], crew: ['snapshot', 'snapshot'], owner: ['snapshot', 'not_found'] },
  unit:  { anonymous: 401, admin: ['snapshot', 'snapshot'], engineer: ['snapshot', 'snapshot'], technician: ['snapshot', 'snapshot'], crew: ['snapshot', 'snapshot'], owner: ['snapshot', 'not_found'] },
};

interface LiveClient {
  /** Resolves to the first message from now on that matches. */
  wait(match: (m: LiveServerMessage) => boolean): Promise<LiveServerMessage>;
  /** Sends a message and resolves to the first message received after it that matches. */
  ask(msg: object, match: (m: LiveServerMessage) => boolean): Promise<LiveServerMessage>;
  send(msg: object): void;
  seen: LiveServerMessage[];
  close(): void;
}

/** Opens `/ws` as a role; resolves to the HTTP status when the upgrade is refused. */
function openSocket(who: Who): Promise<LiveClient | number> {
  const headers: Record<string, string> = { Origin: stack.url };
  if (who !== 'anonymous') headers['Cookie'] = `bw_session=${encodeURIComponent(tokens.get(who)!)}`;
  const ws = new WebSocket(`${stack.url.replace(/^http/, 'ws')}/ws`, { headers });
  const seen: LiveServerMessage[] = [];
  let waiting: { match: (m: LiveServerMessage) => boolean; resolve: (m: LiveServerMessage) => void } | null = null;
  ws.on('message', (data) => {
    const m = JSON.parse(String(data)) as LiveServerMessage;
    seen.push(m);
    if (waiting?.match(m)) {
      waiting.resolve(m);
      waiting = null;
    }
  });
  return new Promise((resolve, reject) => {
    ws.once('unexpected-response', (_req, res) => { resolve(res.statusCode ?? 0); ws.terminate(); });
    ws.once('error', reject);
    const wait = (match: (m: LiveServerMessage) => boolean) => new Promise<LiveServerMessage>((ok) => { waiting = { match, resolve: ok }; });
    const send = (msg: object) => ws.send(JSON.stringify(msg));
    ws.once('open', () => resolve({
      seen, wait, send,
      ask: (msg, match) => {
        const p = wait(match);
        send(msg);
        return p;
      },
      close: () => ws.close(),
    }));
  });
}

const ownerOfSite = () => {
  const owners = new Map<number, Side>();
  for (const u of stack.units.all()) owners.set(u.siteId, u.ownerId === world.own.ownerId ? 'own' : 'other');
  return owners;
};

describe('access matrix over the live socket', () => {
  for (const who of WHO) {
    it(`subscriptions as ${who}: fleet ${JSON.stringify(SOCKET.fleet[who])}, site ${JSON.stringify(SOCKET.site[who])}, unit ${JSON.stringify(SOCKET.unit[who])}`, async () => {
      const client = await openSocket(who);
      if (typeof client === 'number') {
        expect([client, client, client]).toEqual([SOCKET.fleet[who], SOCKET.site[who], SOCKET.unit[who]]);
        return;
      }
      try {
        expect(SOCKET.fleet[who]).not.toBe(401);
        const sides = ownerOfSite();
        // Fleet: the snapshot, and the alarms pushed afterwards, carry the expected owners' units only.
        const snap = await client.ask({ type: 'subscribe', fleet: true }, (m) => m.type === 'snapshot' && m.fleet === true);
        const inSnapshot = new Set(snap.type === 'snapshot' ? snap.units.map((u) => sides.get(u.siteId)) : []);
        const probe = (side: Side) => {
          const u = stack.units.byUnitId(world[side].unitIds[0]!)!;
          stack.live.publishAlarm(u.id, { id: side === 'own' ? -1 : -2, kind: 'stall', severity: 'P3', state: 'active', unitId: u.id, serial: u.serial, siteId: u.siteId, message: 'probe', advice: '', evidence: {}, firstSeenAt: HOUR, raisedAt: HOUR, lastSeenAt: HOUR, clearedAt: null, clearReason: null, acknowledgedAt: null, acknowledgedBy: null });
        };
        // The other owner's alarm goes out first: had it reached this socket, it would arrive before the own one.
        const ownArrived = client.wait((m) => m.type === 'alarm' && 'id' in m.alarm && m.alarm.id === -1);
        probe('other');
        probe('own');
        await ownArrived;
        const pushed = new Set(client.seen.flatMap((m): Side[] => (m.type === 'alarm' && 'id' in m.alarm && m.alarm.id < 0 ? [m.alarm.id === -1 ? 'own' : 'other'] : [])));
        const carried = (set: Set<Side | undefined>) => (set.has('own') && set.has('other') ? 'both' : set.has('own') ? 'own' : set.has('other') ? 'other' : 'none');
        const fleet = carried(inSnapshot) === carried(pushed) ? carried(inSnapshot) : `snapshot ${carried(inSnapshot)}, pushes ${carried(pushed)}`;
        client.send({ type: 'unsubscribe', fleet: true });

        const answer = (m: LiveServerMessage) => m.type === 'snapshot' || m.type === 'error';
        const outcome = async (msg: { siteId?: number; unitId?: number }) => {
          const m = await client.ask({ type: 'subscribe', ...msg }, answer);
          return m.type === 'error' ? m.code : m.type;
        };
        const site = [await outcome({ siteId: world.own.siteId }), await outcome({ siteId: world.other.siteId })];
        const unitOutcome = [await outcome({ unitId: world.own.unitIds[5] }), await outcome({ unitId: world.other.unitIds[5] })];
        expect({ fleet, site, unit: unitOutcome }).toEqual({ fleet: SOCKET.fleet[who], site: SOCKET.site[who], unit: SOCKET.unit[who] });
      } finally {
        client.close();
      }
    });
  }
});
