import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestStack } from '../helpers/test-stack';
import { signedIn } from '../helpers/signed-in';
import type { DetectorRunResult } from '../../shared/contracts/alarms';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const as = signedIn(() => stack.http);
const ids: Record<string, number> = {};

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const u = stack.units.get('QED-2401')!;
  const peer = stack.units.get('QED-2402')!;
  const other = stack.units.get('QHL-2401')!;
  const alarm = async (name: string, unitId: number | null, siteId: number, raised: string, cleared: string | null) => {
    const at = new Date(raised);
    const [id] = await stack.db('alarms').insert({
      unit_id: unitId,
      site_id: siteId,
      kind: unitId === null ? 'comms' : 'trap',
      severity: 'P3',
      state: cleared ? 'cleared' : 'active',
      message: name,
      advice: 'Check it.',
      evidence: '{}',
      first_seen_at: at,
      raised_at: at,
      last_seen_at: cleared ? new Date(cleared) : at,
      cleared_at: cleared ? new Date(cleared) : null,
    });
    ids[name] = id as number;
  };
  // The range asked for below is 10:00–12:00 on 21 June 2026.
  await alarm('inside', u.id, u.siteId, '2026-06-21T10:30:00Z', '2026-06-21T11:00:00Z');
  await alarm('open across', u.id, u.siteId, '2026-06-20T08:00:00Z', null);
  await alarm('cleared across the start', u.id, u.siteId, '2026-06-21T09:00:00Z', '2026-06-21T10:05:00Z');
  await alarm('site-wide', null, u.siteId, '2026-06-21T11:30:00Z', null);
  await alarm('cleared before', u.id, u.siteId, '2026-06-21T08:00:00Z', '2026-06-21T09:59:00Z');
  await alarm('raised after', u.id, u.siteId, '2026-06-21T12:00:00Z', null);
  await alarm('peer unit', peer.id, peer.siteId, '2026-06-21T10:30:00Z', null);
  await alarm('other site', other.id, other.siteId, '2026-06-21T10:30:00Z', null);
});
afterAll(async () => {
  await stack?.stop();
});

describe('POST /api/detectors/run lists the stored alarms beside the run', () => {
  it("gives the chosen units' alarms (and their sites' site-wide ones) open at some time in the range, oldest first", async () => {
    const eng = (await as('engineer@saltmarsh.example')).agent;
    const r = (
      await eng
        .post('/api/detectors/run')
        .send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T12:00:00Z', unitIds: [stack.units.get('QED-2401')!.id] })
        .expect(200)
    ).body as DetectorRunResult;
    expect(r.units).toBe(1);
    expect(r.stored.map((a) => a.message)).toEqual(['open across', 'cleared across the start', 'inside', 'site-wide']);
    expect(r.stored.map((a) => a.id)).toEqual([ids['open across'], ids['cleared across the start'], ids['inside'], ids['site-wide']]);
    expect(r.stored[0]).toMatchObject({ serial: 'QED-2401', kind: 'trap', state: 'active', clearedAt: null });
    expect(r.stored[3]).toMatchObject({ serial: null, unitId: null, kind: 'comms' });
    for (const a of r.alarms) expect(a.id).toBeLessThan(0); // the run's own alarms are not stored
  });

  it('with two units chosen, both units’ alarms; a crew member may not run the detectors (403), an unknown unit is 404', async () => {
    const eng = (await as('engineer@saltmarsh.example')).agent;
    const both = [stack.units.get('QED-2401')!.id, stack.units.get('QED-2402')!.id];
    const r = (
      await eng.post('/api/detectors/run').send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T12:00:00Z', unitIds: both }).expect(200)
    ).body as DetectorRunResult;
    expect(r.stored.map((a) => a.message).sort()).toEqual(['cleared across the start', 'inside', 'open across', 'peer unit', 'site-wide']);
    await (
      await as('crew1@saltmarsh.example')
    ).agent
      .post('/api/detectors/run')
      .send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T12:00:00Z', unitIds: both })
      .expect(403);
    await eng
      .post('/api/detectors/run')
      .send({ from: '2026-06-21T10:00:00Z', to: '2026-06-21T12:00:00Z', unitIds: [999999] })
      .expect(404);
    const bad = await eng.post('/api/detectors/run').send({ from: 'yesterday', to: '2026-06-21T12:00:00Z' }).expect(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(['from']);
  });
});
