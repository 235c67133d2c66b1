import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD, DEMO_SURVEYS } from '../../seeds/demo-world';
import { DEMO_SITES } from '../../shared/demo-world';
import { bestReachableOrientation, irradianceAt } from '../../shared/landscape';
import type { SiteSurvey } from '../../shared/contracts/survey';
import type { SurveyRevision } from '../../shared/contracts/survey-revisions';
import { siteSky } from '../../server/health/site-sky';
import { perturbSurvey } from '../eval/survey-perturbation';

// The glass-facade roof (QHL): its seeded survey is the truth the scans are taken under; the site is then given a
// survey with `high` survey error, as a careless survey would have it. Invented data, checks only.
const demo = DEMO_SITES.find((s) => s.code === 'QHL')!;
const where = { latitudeDeg: demo.latitude_deg, longitudeDeg: demo.longitude_deg, elevationM: demo.elevation_m };
const truth = DEMO_SURVEYS['QHL']!;
const wrong = perturbSurvey(truth, demo.albedo, 'high', 3);
const SCANS_UTC = [6, 9, 12, 15];
const clock = Date.parse('2026-06-12T11:00:00Z');

let stack: Awaited<ReturnType<typeof startTestStack>>;
let siteId: number;
let emptySiteId: number;
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { health: { now: () => clock }, surveyRevisions: { now: () => clock } } });
  siteId = (await stack.db('sites').where({ name: demo.name }).first('id')).id;
  emptySiteId = (
    await stack
      .db('sites')
      .where({ name: DEMO_SITES.find((s) => s.code === 'QED')!.name })
      .first('id')
  ).id;
  const admin = await as('admin@saltmarsh.example');
  await admin.put(`/api/sites/${siteId}/survey`).send(wrong.survey).expect(200);
  await admin
    .patch(`/api/sites/${siteId}`)
    .send({ albedo: Math.round(wrong.albedo * 1000) / 1000 })
    .expect(200);
  // Four scans of QHL-2402 through 10 June, each a 4 × 12 raster under the true survey and the clear-sky magnitudes the
  // station reads then.
  const unitId = stack.units.get('QHL-2402')!.id;
  for (const h of SCANS_UTC) {
    const t0 = Date.UTC(2026, 5, 10, h);
    const clear = siteSky({ ...where, albedo: demo.albedo }, truth, t0 + 60_000, null).input;
    await stack.db('weather').insert(
      [0, 60_000, 120_000].map((dt) => ({
        site_id: siteId,
        ts: new Date(t0 + dt),
        ghi_wm2: clear.ghiWm2,
        dhi_wm2: clear.dhiWm2,
        air_temp_c: 15,
        wind_ms: 2,
        gust_ms: 3,
      })),
    );
    const sky = siteSky({ ...where, albedo: demo.albedo }, truth, t0 + 60_000, { ghiWm2: clear.ghiWm2!, dhiWm2: clear.dhiWm2! }).sky;
    const commandId = `scan-${h}`;
    const rows = [10, 30, 50, 70].map((t, i) => {
      const ts = new Date(t0 + i * 30_000);
      const samples = Array.from({ length: 12 }, (_, j) => [t, j * 30, Math.round(irradianceAt(sky, t, j * 30) * 10) / 10]);
      return {
        unit_id: unitId,
        ts,
        kind: 'scan-samples',
        body: JSON.stringify({ v: 1, ts: ts.toISOString(), kind: 'scan-samples', commandId, samples }),
      };
    });
    const done = new Date(t0 + 120_000);
    rows.push({
      unit_id: unitId,
      ts: done,
      kind: 'scan-complete',
      body: JSON.stringify({ v: 1, ts: done.toISOString(), kind: 'scan-complete', commandId }),
    });
    await stack.db('unit_events').insert(rows);
  }
}, 60_000);
afterAll(async () => {
  await stack?.stop();
});

async function as(email: string) {
  const agent = request.agent(stack.http);
  await agent.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  return agent;
}
const storedSite = async () => {
  const r = await stack.db('sites').where({ id: siteId }).first('survey', 'albedo');
  return { survey: (typeof r.survey === 'string' ? JSON.parse(r.survey) : r.survey) as SiteSurvey, albedo: Number(r.albedo) };
};
const auditActions = async () =>
  (
    await stack
      .db('audit_log')
      .where({ target: `site:${siteId}` })
      .orderBy('id')
      .select('action', 'detail')
  ).map((r) => r.action as string);

/** Opens a trap alarm on a unit whose latest readings get `share` of the model's best at `atMs` under `survey`. */
function openTrap(serial: string, survey: SiteSurvey, albedo: number, share: number, atMs: number) {
  const u = stack.units.get(serial)!;
  const sky = siteSky({ ...where, albedo }, survey, atMs, null).sky;
  const best = bestReachableOrientation(sky, { tiltRangeDeg: [0, 85], azimuthRangeDeg: [0, 360] });
  const readings = { ts: new Date(atMs).toISOString(), poaWm2: share * best.wm2, tiltDeg: 40, azimuthDeg: 100, mode: 'settled' };
  stack.health.engine.book.assess({ unitId: u.id, serial, siteId }, 'trap', true, atMs, { delayOnMs: 0, clearDelayMs: 600_000 }, () => ({
    severity: 'P3',
    message: `Settled on ${Math.round(readings.poaWm2)} W/m².`,
    advice: 'Send a scan.',
    evidence: { readings },
  }));
  return u.id;
}

describe('survey revisions', () => {
  it('are hidden from owners (404, their own site too) and field crews (403); technicians read, only engineers and admins propose', async () => {
    const owner = await as('owner@quillmoor.example');
    await owner.get(`/api/sites/${siteId}/survey-revisions`).expect(404);
    await owner.post(`/api/sites/${siteId}/survey-revisions/propose`).send({}).expect(404);
    const crew = await as('crew1@saltmarsh.example');
    await crew.get(`/api/sites/${siteId}/survey-revisions`).expect(403);
    await crew.post(`/api/sites/${siteId}/survey-revisions/propose`).send({}).expect(403);
    const tech = await as('tech1@saltmarsh.example');
    expect((await tech.get(`/api/sites/${siteId}/survey-revisions`).expect(200)).body).toEqual([]);
    await tech.post(`/api/sites/${siteId}/survey-revisions/propose`).send({}).expect(403);
  });

  it('refuses to propose without enough daylight scans, saying how many there are and how many it needs', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const res = await eng.post(`/api/sites/${emptySiteId}/survey-revisions/propose`).send({}).expect(422);
    expect(res.body.error.code).toBe('too_few_scans');
    expect(res.body.error.message).toMatch(/at least 3 complete daylight scans of this site's units from the last 30 days; there are 0/);
    // The scans of QHL are two days old: a one-day window holds none of them.
    const recent = await eng.post(`/api/sites/${siteId}/survey-revisions/propose`).send({ days: 1 }).expect(422);
    expect(recent.body.error.message).toMatch(/last 1 days; there are 0/);
    const bad = await eng.post(`/api/sites/${siteId}/survey-revisions/propose`).send({ days: 400 }).expect(400);
    expect(bad.body.error.fields).toEqual({ days: 'Must be from 1 to 90 days.' });
    await eng.post(`/api/sites/${siteId}/survey-revisions/propose`).send({ days: 5, extra: 1 }).expect(400);
  });

  it('proposes corrections fitted to the scans without applying them; a rejection with a reason leaves the survey as it was', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const before = await storedSite();
    const p: SurveyRevision = (await eng.post(`/api/sites/${siteId}/survey-revisions/propose`).send({}).expect(201)).body;
    expect(p).toMatchObject({
      siteId,
      version: 1,
      state: 'proposed',
      proposedBy: { name: expect.any(String) },
      decidedAt: null,
      outcome: null,
    });
    // Four scans: each is fitted, held out to check the fit on (one in four, from four usable ones) or left out with the sun
    // near a horizon or facade edge.
    expect(p.fit.scans + p.fit.scansLeftOut).toBe(4);
    expect(p.fit.samples).toBe((p.fit.scans - (p.checkError?.scans ?? 0)) * 48);
    expect(p.fit.sources.map((s) => s.commandId).sort()).toEqual(['scan-12', 'scan-15', 'scan-6', 'scan-9']);
    expect(p.baseSurvey).toEqual(before.survey);
    expect(p.modelError.after.meanAbsWm2).toBeLessThan(p.modelError.before.meanAbsWm2);
    const keys = p.parameters.map((x) => x.key);
    expect(keys).toEqual(
      expect.arrayContaining(['albedo', 'reflectors.0.reflectance', 'reflectors.0.normalAzimuthDeg', 'reflectors.1.reflectance']),
    );
    for (const x of p.parameters) {
      expect(x.after).toBeGreaterThanOrEqual(x.bounds[0]);
      expect(x.after).toBeLessThanOrEqual(x.bounds[1]);
    }
    // Never applied by proposing.
    expect(await storedSite()).toEqual(before);
    expect(await auditActions()).toContain('survey-revision-propose');

    await eng.post(`/api/sites/${siteId}/survey-revisions/${p.id}/reject`).send({ reason: '' }).expect(400);
    const rejected: SurveyRevision = (
      await eng.post(`/api/sites/${siteId}/survey-revisions/${p.id}/reject`).send({ reason: 'Facade re-measured next week' }).expect(200)
    ).body;
    expect(rejected).toMatchObject({ state: 'rejected', reason: 'Facade re-measured next week', decidedBy: { name: expect.any(String) } });
    expect(await storedSite()).toEqual(before);
    const again = await eng.post(`/api/sites/${siteId}/survey-revisions/${p.id}/accept`).send({ reason: 'changed my mind' }).expect(409);
    expect(again.body.error.message).toMatch(/already rejected/);
    expect(await auditActions()).toContain('survey-revision-reject');
    await eng.get(`/api/sites/${siteId}/survey-revisions/999999`).expect(404);
  }, 60_000);

  it('accepting makes the revision the survey through the survey listeners, audits it, and clears the open traps the new model does not see', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const p: SurveyRevision = (await eng.post(`/api/sites/${siteId}/survey-revisions/propose`).send({ days: 30 }).expect(201)).body;
    expect(p.version).toBe(2);
    const at = clock - 5 * 60_000;
    const fine = openTrap('QHL-2403', p.proposedSurvey, p.proposedAlbedo, 0.95, at);
    const stuck = openTrap('QHL-2404', p.proposedSurvey, p.proposedAlbedo, 0.3, at);
    await stack.health.flush();
    const statements = vi.spyOn(stack.statementLocks, 'onSurveyChanged');

    const accepted: SurveyRevision = (
      await eng.post(`/api/sites/${siteId}/survey-revisions/${p.id}/accept`).send({ reason: 'Matches the scans of 10 June' }).expect(200)
    ).body;
    expect(accepted).toMatchObject({
      state: 'accepted',
      reason: 'Matches the scans of 10 June',
      outcome: { trapAlarmsReassessed: 2, trapAlarmsCleared: 1 },
    });
    expect(await storedSite()).toEqual({ survey: p.proposedSurvey, albedo: p.proposedAlbedo });
    expect((await eng.get(`/api/sites/${siteId}/survey`).expect(200)).body).toEqual(p.proposedSurvey);
    // Locked statements hear of the new survey the way a manual save tells them (they mark "restatement suggested").
    expect(statements).toHaveBeenCalledWith(siteId);
    const actions = await auditActions();
    expect(actions.slice(-2)).toEqual(['survey-revision-accept', 'site-survey-update']);

    const alarm = async (unitId: number) =>
      stack.db('alarms').where({ unit_id: unitId, kind: 'trap' }).orderBy('id', 'desc').first('state', 'clear_reason');
    expect(await alarm(fine)).toMatchObject({
      state: 'cleared',
      clear_reason: expect.stringMatching(/^survey revision 2 accepted: unit at 95 % of the revised best \(\d+ W\/m²\)$/),
    });
    expect((await alarm(stuck))!.state).toBe('active');
    await eng.post(`/api/sites/${siteId}/survey-revisions/${p.id}/accept`).send({ reason: 'twice' }).expect(409);

    const list: SurveyRevision[] = (await eng.get(`/api/sites/${siteId}/survey-revisions`).expect(200)).body;
    expect(list.map((r) => [r.version, r.state])).toEqual([
      [2, 'accepted'],
      [1, 'rejected'],
    ]);
  }, 60_000);

  it('one fit per site at a time; a proposal whose base survey was edited by hand since is superseded on accepting, and nothing is applied', async () => {
    const eng = await as('engineer@saltmarsh.example');
    const admin = await as('admin@saltmarsh.example');
    const both = await Promise.all([eng, admin].map((a) => a.post(`/api/sites/${siteId}/survey-revisions/propose`).send({})));
    expect(both.map((r) => r.status).sort()).toEqual([201, 409]);
    expect(both.find((r) => r.status === 409)!.body.error.message).toMatch(/already running/);
    const p: SurveyRevision = both.find((r) => r.status === 201)!.body;
    const edited = { ...p.baseSurvey, skyType: 'isotropic' as const };
    await eng.put(`/api/sites/${siteId}/survey`).send(edited).expect(200);
    const res = await eng.post(`/api/sites/${siteId}/survey-revisions/${p.id}/accept`).send({ reason: 'looks right' }).expect(409);
    expect(res.body.error.message).toMatch(/survey changed after this revision was proposed/);
    expect((await eng.get(`/api/sites/${siteId}/survey-revisions/${p.id}`).expect(200)).body.state).toBe('superseded');
    expect((await storedSite()).survey).toEqual(edited);
  }, 60_000);
});
