import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import type { UnitInfo } from '../../server/services/unit-directory';

let stack: Awaited<ReturnType<typeof startTestStack>>;
let clock = Date.parse('2026-06-21T23:00:00Z');
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { health: { now: () => clock, tickMs: 3_600_000 } } });
});
afterAll(async () => {
  await stack?.stop();
});

async function as(email: string) {
  const agent = request.agent(stack.http);
  await agent.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  return agent;
}
const unit = (serial: string): UnitInfo => stack.units.get(serial)!;

describe('alarms over HTTP', () => {
  it('a unit that went offline gets a comms alarm: listed, scoped to its owner, acknowledged by a technician, cleared by its next report', async () => {
    const u = unit('QHL-2401');
    stack.health.status(u, { v: 1, online: false });
    clock += 31 * 60_000; // night: the comms delay is 30 min
    stack.health.tick();
    await stack.health.flush();

    const tech = await as('tech1@saltmarsh.example');
    const list = (await tech.get(`/api/alarms?unitId=${u.id}&state=active`).expect(200)).body;
    expect(list).toHaveLength(1);
    expect(list[0]).toMatchObject({ kind: 'comms', severity: 'P4', state: 'active', serial: 'QHL-2401', siteId: u.siteId });
    expect(list[0].message).toMatch(/without a clean disconnect/);
    const id = list[0].id;

    const ownOwner = await as('owner@quillmoor.example');
    expect((await ownOwner.get(`/api/alarms/${id}`).expect(200)).body.id).toBe(id);
    const otherOwner = await as('owner@fenwicklane.example');
    await otherOwner.get(`/api/alarms/${id}`).expect(404);
    expect((await otherOwner.get('/api/alarms').expect(200)).body.map((a: { id: number }) => a.id)).not.toContain(id);
    await otherOwner.get(`/api/alarms?siteId=${u.siteId}`).expect(404);

    await (await as('crew1@saltmarsh.example')).post(`/api/alarms/${id}/acknowledge`).expect(403);
    await ownOwner.post(`/api/alarms/${id}/acknowledge`).expect(403);
    const acked = (await tech.post(`/api/alarms/${id}/acknowledge`).expect(200)).body;
    expect(acked.acknowledgedBy).toBe('Mara Okonjo');
    expect(acked.acknowledgedAt).not.toBeNull();

    stack.health.status(u, { v: 1, online: true, ts: new Date(clock).toISOString() });
    await stack.health.flush();
    const after = (await tech.get(`/api/alarms/${id}`).expect(200)).body;
    expect(after.state).toBe('cleared');
    expect(after.clearReason).toBe('condition ended');
  });

  it('serves the latest scan rebuilt, with the go-to offer', async () => {
    const u = unit('QHL-2402');
    const t0 = Date.parse('2026-06-21T10:00:00Z');
    const peak = (t: number, a: number) => 900 - 8 * Math.abs(t - 50) - 4 * Math.abs(a - 240);
    const rows = [10, 30, 50, 70].map((t, i) => ({
      unit_id: u.id,
      ts: new Date(t0 + i * 60_000),
      kind: 'scan-samples',
      body: JSON.stringify({
        v: 1,
        ts: new Date(t0 + i * 60_000).toISOString(),
        kind: 'scan-samples',
        commandId: 'scan-7',
        samples: Array.from({ length: 13 }, (_, j) => [t, j * 30, peak(t, j * 30)]),
      }),
    }));
    rows.push({
      unit_id: u.id,
      ts: new Date(t0 + 5 * 60_000),
      kind: 'scan-complete',
      body: JSON.stringify({ v: 1, ts: new Date(t0 + 5 * 60_000).toISOString(), kind: 'scan-complete', commandId: 'scan-7' }),
    });
    await stack.db('unit_events').insert(rows);
    const eng = await as('engineer@saltmarsh.example');
    const r = (await eng.get(`/api/units/${u.id}/scans/latest`).expect(200)).body;
    expect(r).toMatchObject({ commandId: 'scan-7', complete: true, goto: { kind: 'goto', tiltDeg: 50, azimuthDeg: 240 } });
    expect(r.landscape.samples).toBe(52);
    expect(r.landscape.globalMax).toMatchObject({ tiltDeg: 50, azimuthDeg: 240, wm2: 900 });
    expect(r.model.globalMax.wm2).toBeGreaterThan(0);
    await eng.get(`/api/units/${unit('QHL-2403').id}/scans/latest`).expect(404);
    await (await as('owner@fenwicklane.example')).get(`/api/units/${u.id}/scans/latest`).expect(404);
  });

  it('per-site health settings: defaults, engineer overrides, validation, roles', async () => {
    const siteId = unit('QHL-2401').siteId;
    const eng = await as('engineer@saltmarsh.example');
    const before = (await eng.get(`/api/sites/${siteId}/health-settings`).expect(200)).body;
    expect(before.effective.trapRatio).toBe(before.defaults.trapRatio);
    expect(before.ranges.stowGustMs).toEqual({ min: 5, max: 35, unit: 'm/s' });
    const saved = (
      await eng.put(`/api/sites/${siteId}/health-settings`).send({ trapRatio: 0.8, stowGustMs: 16, reason: 'Tighter traps' }).expect(200)
    ).body;
    expect(saved.effective).toMatchObject({ trapRatio: 0.8, stowGustMs: 16 });
    expect(saved.overrides).toEqual({ trapRatio: 0.8, stowGustMs: 16 });
    await eng.put(`/api/sites/${siteId}/health-settings`).send({ trapRatio: 2, reason: 'Out of range' }).expect(400);
    // A gust limit no wind reaches would silently switch the not-stowed (P1) alarm off.
    const huge = await eng.put(`/api/sites/${siteId}/health-settings`).send({ stowGustMs: 1e300, reason: 'Out of range' });
    expect(huge.status).toBe(400);
    expect(huge.body.error.fields).toEqual({ stowGustMs: 'Must be between 5 and 35 m/s.' });
    expect((await eng.get(`/api/sites/${siteId}/health-settings`).expect(200)).body.effective.stowGustMs).toBe(16);
    await eng.put(`/api/sites/${siteId}/health-settings`).send({ noSuchSetting: 1, reason: 'Unknown' }).expect(400);
    await (
      await as('tech1@saltmarsh.example')
    )
      .put(`/api/sites/${siteId}/health-settings`)
      .send({ trapRatio: 0.8, reason: 'Not mine to change' })
      .expect(403);
  });

  it('runs the detectors on demand over a stored range (engineer), and refuses an empty or too long range', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const r = (
      await eng
        .post('/api/detectors/run')
        .send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T10:30:00Z', unitIds: [unit('QED-2401').id] })
        .expect(200)
    ).body;
    expect(r).toMatchObject({ units: 1, reports: 0, alarms: [] });
    await eng.post('/api/detectors/run').send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T09:00:00Z' }).expect(400);
    await eng.post('/api/detectors/run').send({ from: '2026-06-01T10:00:00Z', to: '2026-06-21T09:00:00Z' }).expect(400);
    await (
      await as('owner@quillmoor.example')
    )
      .post('/api/detectors/run')
      .send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T10:30:00Z' })
      .expect(403);
  });

  it('answers the old path of the detectors run, beside the liveness check /api/health, with a 308 to the new one', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const res = await eng.post('/api/health/run').send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T10:30:00Z' });
    expect(res.status).toBe(308);
    expect(res.headers['location']).toBe('/api/detectors/run');
    // The liveness check is untouched: no session needed, database and broker only.
    const health = await request(stack.http).get('/api/health');
    expect(health.status).toBe(200);
    expect(Object.keys(health.body).sort()).toEqual(['broker', 'database', 'status']);
  });
});
