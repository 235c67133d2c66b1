import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestStack } from '../helpers/test-stack';
import { signedIn } from '../helpers/signed-in';
import type { HealthSettingsHistory } from '../../shared/contracts/alarms';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const as = signedIn(() => stack.http);
let ownSite: number; // Quillmoor's (the demo owner user's)
let otherSite: number; // Fenwick Lane's

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const site = async (owner: string) =>
    (await stack.db('sites as s').join('owners as o', 'o.id', 's.owner_id').where('o.name', owner).orderBy('s.id').first('s.id'))
      .id as number;
  ownSite = await site('Quillmoor Energy Cooperative');
  otherSite = await site('Fenwick Lane Schools Trust');
});
afterAll(async () => {
  await stack?.stop();
});

describe('saving health settings needs a reason', () => {
  it('refuses a save without a reason, or with a blank or over-long one, naming the field, and changes nothing', async () => {
    const eng = (await as('engineer@saltmarsh.example')).agent;
    for (const body of [
      { stowGustMs: 16 },
      { stowGustMs: 16, reason: '   ' },
      { stowGustMs: 16, reason: 'x'.repeat(501) },
      { stowGustMs: 16, reason: 7 },
    ]) {
      const r = await eng.put(`/api/sites/${otherSite}/health-settings`).send(body);
      expect(r.status).toBe(400);
      expect(Object.keys(r.body.error.fields)).toEqual(['reason']);
    }
    const both = await eng.put(`/api/sites/${otherSite}/health-settings`).send({ stowGustMs: 99 });
    expect(both.status).toBe(400);
    expect(both.body.error.fields).toMatchObject({ stowGustMs: 'Must be between 5 and 35 m/s.' });
    expect((await eng.get(`/api/sites/${otherSite}/health-settings`).expect(200)).body.overrides).toEqual({});
    expect((await eng.get(`/api/sites/${otherSite}/health-settings/history`).expect(200)).body.total).toBe(0);
  });
});

describe('GET /api/sites/:id/health-settings/history', () => {
  it('lists every save newest first: who, when, why, and each override before → after (null = the default)', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const admin = await as('admin@saltmarsh.example');
    await eng.agent.put(`/api/sites/${ownSite}/health-settings`).send({ stowGustMs: 16, reason: 'Gusty roof edge' }).expect(200);
    await admin.agent
      .put(`/api/sites/${ownSite}/health-settings`)
      .send({ stowGustMs: 15, trapRatio: 0.8, reason: '  Facade traps over the winter  ' })
      .expect(200);
    await eng.agent
      .put(`/api/sites/${ownSite}/health-settings`)
      .send({ trapRatio: 0.8, reason: 'Back to the default gust limit' })
      .expect(200);

    const tech = (await as('tech1@saltmarsh.example')).agent;
    const h = (await tech.get(`/api/sites/${ownSite}/health-settings/history`).expect(200)).body as HealthSettingsHistory;
    expect(h.siteId).toBe(ownSite);
    expect(h.total).toBe(3);
    expect(h.entries.map((e) => [e.by?.name, e.reason, e.changes])).toEqual([
      ['Ravi Lindqvist', 'Back to the default gust limit', [{ key: 'stowGustMs', from: 15, to: null }]],
      [
        'Ada Kestrel',
        'Facade traps over the winter',
        [
          { key: 'trapRatio', from: null, to: 0.8 },
          { key: 'stowGustMs', from: 16, to: 15 },
        ],
      ],
      ['Ravi Lindqvist', 'Gusty roof edge', [{ key: 'stowGustMs', from: null, to: 16 }]],
    ]);
    expect(h.entries[0]!.by!.id).toBe(eng.userId);
    for (const e of h.entries) expect(Date.parse(e.at)).toBeGreaterThan(Date.now() - 60_000);
    expect(Date.parse(h.entries[0]!.at)).toBeGreaterThanOrEqual(Date.parse(h.entries[2]!.at));

    const page = (await tech.get(`/api/sites/${ownSite}/health-settings/history?limit=1`).expect(200)).body as HealthSettingsHistory;
    expect(page.total).toBe(3);
    expect(page.entries.map((e) => e.reason)).toEqual(['Back to the default gust limit']);
  });

  it('a change saved before reasons were asked for reads with reason null', async () => {
    await stack.db('audit_log').insert({
      user_id: null,
      action: 'health-settings-update',
      target: `site:${otherSite}`,
      detail: JSON.stringify({ before: {}, after: { trapRatio: 0.82 } }),
    });
    const h = (await (await as('engineer@saltmarsh.example')).agent.get(`/api/sites/${otherSite}/health-settings/history`).expect(200))
      .body as HealthSettingsHistory;
    expect(h.entries[0]).toMatchObject({ by: null, reason: null, changes: [{ key: 'trapRatio', from: null, to: 0.82 }] });
  });

  it('is for the control room: crews and owners 403, an unknown site 404, a bad limit 400 naming it', async () => {
    await (await as('crew1@saltmarsh.example')).agent.get(`/api/sites/${ownSite}/health-settings/history`).expect(403);
    await (await as('owner@quillmoor.example')).agent.get(`/api/sites/${ownSite}/health-settings/history`).expect(403);
    const eng = (await as('engineer@saltmarsh.example')).agent;
    await eng.get('/api/sites/999999/health-settings/history').expect(404);
    const bad = await eng.get(`/api/sites/${ownSite}/health-settings/history?limit=0`).expect(400);
    expect(bad.body.error.fields).toEqual({ limit: 'Must be between 1 and 200.' });
    const unknown = await eng.get(`/api/sites/${ownSite}/health-settings/history?since=1`).expect(400);
    expect(unknown.body.error.fields).toEqual({ since: 'Unknown field.' });
  });
});
