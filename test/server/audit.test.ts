import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import type { AuditPage } from '../../shared/contracts/audit';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const ids = { tech: 0, eng: 0, admin: 0, unit: 0, site: 0, serial: '' };

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const user = async (email: string) => (await stack.db('users').where({ email }).first('id')).id as number;
  ids.tech = await user('tech1@saltmarsh.example');
  ids.eng = await user('engineer@saltmarsh.example');
  ids.admin = await user('admin@saltmarsh.example');
  const u = await stack
    .db('units')
    .join('sites', 'sites.id', 'units.site_id')
    .where('sites.name', 'Harbourside Library Roof')
    .orderBy('units.id')
    .first('units.id', 'units.serial', 'units.site_id');
  Object.assign(ids, { unit: u.id, site: u.site_id, serial: u.serial });
});
afterAll(async () => {
  await stack?.stop();
});

async function as(email: string) {
  const agent = request.agent(stack.http);
  await agent.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  return agent;
}
const auditRows = (action: string) => stack.db('audit_log').where({ action }).orderBy('id');
const detailOf = (r: { detail: unknown }) => (typeof r.detail === 'string' ? JSON.parse(r.detail) : r.detail);

async function insertAlarm(): Promise<number> {
  const at = new Date('2026-06-21T10:00:00Z');
  const [id] = await stack.db('alarms').insert({
    unit_id: ids.unit,
    site_id: ids.site,
    kind: 'stall',
    severity: 'P2',
    state: 'active',
    message: 'Tilt drive stalled.',
    advice: 'Check the drive.',
    evidence: '{}',
    first_seen_at: at,
    raised_at: at,
    last_seen_at: at,
  });
  return id as number;
}

describe('what is written to the audit log', () => {
  it('an alarm acknowledgement: who, which alarm, its unit, kind and severity; acknowledging again adds nothing', async () => {
    const alarmId = await insertAlarm();
    const before = (await auditRows('alarm-acknowledge')).length;
    await (await as('tech1@saltmarsh.example')).post(`/api/alarms/${alarmId}/acknowledge`).expect(200);
    const rows = await auditRows('alarm-acknowledge');
    expect(rows).toHaveLength(before + 1);
    const row = rows.at(-1)!;
    expect(row).toMatchObject({ user_id: ids.tech, target: `alarm:${alarmId}` });
    expect(detailOf(row)).toEqual({ unitId: ids.unit, serial: ids.serial, siteId: ids.site, kind: 'stall', severity: 'P2' });

    await (await as('engineer@saltmarsh.example')).post(`/api/alarms/${alarmId}/acknowledge`).expect(200);
    expect(await auditRows('alarm-acknowledge')).toHaveLength(before + 1);
  });

  it('a health-settings change: who, which site, the overrides before and after, why; a refused change writes nothing', async () => {
    const eng = await as('engineer@saltmarsh.example');
    await eng.put(`/api/sites/${ids.site}/health-settings`).send({ stowGustMs: 16, reason: 'Gusty site' }).expect(200);
    await eng.put(`/api/sites/${ids.site}/health-settings`).send({ stowGustMs: 15, trapRatio: 0.8, reason: 'Facade traps' }).expect(200);
    const rows = await auditRows('health-settings-update');
    expect(rows.map((r) => r.user_id)).toEqual([ids.eng, ids.eng]);
    expect(rows.map((r) => r.target)).toEqual([`site:${ids.site}`, `site:${ids.site}`]);
    expect(detailOf(rows[1]!)).toEqual({ before: { stowGustMs: 16 }, after: { stowGustMs: 15, trapRatio: 0.8 }, reason: 'Facade traps' });

    const refused = await eng.put(`/api/sites/${ids.site}/health-settings`).send({ stowGustMs: 1e300, reason: 'Too far' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields).toEqual({ stowGustMs: 'Must be between 5 and 35 m/s.' });
    expect(await auditRows('health-settings-update')).toHaveLength(2);
    expect((await eng.get(`/api/sites/${ids.site}/health-settings`).expect(200)).body.effective.stowGustMs).toBe(15);
  });

  it('a CSV export: who, which unit and the range', async () => {
    const eng = await as('engineer@saltmarsh.example');
    await eng.get(`/api/units/${ids.unit}/traces.csv?from=2026-06-10T08:00:00Z&to=2026-06-10T09:00:00Z`).expect(200);
    const rows = await auditRows('trace-export');
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ user_id: ids.eng, target: `unit:${ids.unit}` });
    expect(detailOf(rows[0]!)).toEqual({ serial: ids.serial, from: '2026-06-10T08:00:00.000Z', to: '2026-06-10T09:00:00.000Z' });
    // A refused export (range too long) is not an export.
    await eng.get(`/api/units/${ids.unit}/traces.csv?from=2026-06-01T08:00:00Z&to=2026-06-10T09:00:00Z`).expect(400);
    expect(await auditRows('trace-export')).toHaveLength(1);
  });
});

describe('GET /api/audit', () => {
  it('is for admins only', async () => {
    await request(stack.http).get('/api/audit').expect(401);
    for (const email of ['engineer@saltmarsh.example', 'tech1@saltmarsh.example', 'crew1@saltmarsh.example', 'owner@quillmoor.example']) {
      expect((await (await as(email)).get('/api/audit')).status, email).toBe(403);
    }
    expect((await (await as('admin@saltmarsh.example')).get('/api/audit')).status).toBe(200);
  });

  it('lists newest first with the person, the action, the target in words and the detail, with a total for paging', async () => {
    const admin = await as('admin@saltmarsh.example');
    const base = new Date('2030-01-01T00:00:00Z').getTime();
    await stack.db('audit_log').insert(
      Array.from({ length: 7 }, (_, i) => ({
        at: new Date(base + i * 60_000),
        user_id: ids.tech,
        action: 'paging-probe',
        target: `unit:${ids.unit}`,
        detail: JSON.stringify({ n: i }),
      })),
    );
    const first = (await admin.get('/api/audit?action=paging-probe&limit=3').expect(200)).body as AuditPage;
    expect(first.total).toBe(7);
    expect(first.limit).toBe(3);
    expect(first.offset).toBe(0);
    expect(first.entries.map((e) => (e.detail as { n: number }).n)).toEqual([6, 5, 4]);
    expect(first.entries[0]).toMatchObject({
      at: '2030-01-01T00:06:00.000Z',
      action: 'paging-probe',
      target: `unit:${ids.unit}`,
      targetLabel: `Unit ${ids.serial}`,
      user: { id: ids.tech, name: 'Mara Okonjo', email: 'tech1@saltmarsh.example' },
    });
    const last = (await admin.get('/api/audit?action=paging-probe&limit=3&offset=6').expect(200)).body as AuditPage;
    expect(last.entries.map((e) => (e.detail as { n: number }).n)).toEqual([0]);
    expect(last.total).toBe(7);
  });

  it('filters by action, person, target and time range, and combines them', async () => {
    const admin = await as('admin@saltmarsh.example');
    const t = (m: number) => new Date(Date.UTC(2031, 0, 1, 0, m));
    await stack.db('audit_log').insert([
      { at: t(0), user_id: ids.eng, action: 'filter-probe-a', target: `site:${ids.site}` },
      { at: t(10), user_id: ids.tech, action: 'filter-probe-a', target: `unit:${ids.unit}` },
      { at: t(20), user_id: ids.eng, action: 'filter-probe-b', target: `unit:${ids.unit}` },
      { at: t(30), user_id: null, action: 'filter-probe-b', target: 'nobody@example.org' },
    ]);
    const q = async (query: string) =>
      ((await admin.get(`/api/audit?${query}`).expect(200)).body as AuditPage).entries.map((e) => `${e.action}@${e.at.slice(14, 16)}`);
    const range = `from=${t(0).toISOString()}&to=${t(31).toISOString()}`;
    expect(await q(range)).toEqual(['filter-probe-b@30', 'filter-probe-b@20', 'filter-probe-a@10', 'filter-probe-a@00']);
    expect(await q(`${range}&action=filter-probe-a`)).toEqual(['filter-probe-a@10', 'filter-probe-a@00']);
    expect(await q(`${range}&userId=${ids.eng}`)).toEqual(['filter-probe-b@20', 'filter-probe-a@00']);
    expect(await q(`${range}&target=unit:${ids.unit}`)).toEqual(['filter-probe-b@20', 'filter-probe-a@10']);
    expect(await q(`${range}&target=unit:${ids.unit}&userId=${ids.eng}`)).toEqual(['filter-probe-b@20']);
    // from is inclusive, to exclusive.
    expect(await q(`from=${t(10).toISOString()}&to=${t(30).toISOString()}`)).toEqual(['filter-probe-b@20', 'filter-probe-a@10']);
    const anonymous = ((await admin.get(`/api/audit?${range}&action=filter-probe-b`).expect(200)).body as AuditPage).entries[0]!;
    expect(anonymous.user).toBeNull();
    expect(anonymous.targetLabel).toBe('nobody@example.org');
  });

  it('refuses a bad query with 400 naming every bad field', async () => {
    const admin = await as('admin@saltmarsh.example');
    const res = await admin.get('/api/audit?limit=0&offset=-1&userId=abc&from=yesterday&to=2030-01-01&action=DROP%20TABLE&colour=red');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['action', 'colour', 'from', 'limit', 'offset', 'to', 'userId']);
    expect(res.body.error.fields.limit).toBe('Must be between 1 and 200.');
    const empty = await admin.get('/api/audit?from=2030-01-02T00:00:00Z&to=2030-01-01T00:00:00Z');
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields).toEqual({ to: 'Must be after from.' });
  });

  it('shows sign-ins, acknowledgements and exports of real use in words', async () => {
    const admin = await as('admin@saltmarsh.example');
    const page = (await admin.get('/api/audit?action=sign-in&limit=1').expect(200)).body as AuditPage;
    expect(page.entries[0]!.user).not.toBeNull();
    const acks = (await admin.get('/api/audit?action=alarm-acknowledge').expect(200)).body as AuditPage;
    expect(acks.entries[0]!.targetLabel).toBe(`Alarm on ${ids.serial} (actuator stall)`);
    const settings = (await admin.get(`/api/audit?action=health-settings-update&target=site:${ids.site}`).expect(200)).body as AuditPage;
    expect(settings.entries[0]!.targetLabel).toBe('Site Harbourside Library Roof');
  });
});
