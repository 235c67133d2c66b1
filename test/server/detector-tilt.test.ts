import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MqttClient } from 'mqtt';
import { startTestStack } from '../helpers/test-stack';
import { signedIn } from '../helpers/signed-in';
import { connectUnit, publish, waitFor } from '../helpers/fake-unit';
import { unitTopic } from '../../shared/contracts/topics';
import type { Command } from '../../shared/contracts/wire';
import type { ApplyDetectorTiltResult, DetectorTiltRecommendation } from '../../shared/contracts/detector-tilt';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const as = signedIn(() => stack.http);
let siteId: number; // Harbourside Library Roof (glass facade): QHL-2401 … QHL-2406
const units: MqttClient[] = [];

beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { commands: { ackTimeoutMs: 400 } } });
  siteId = stack.units.get('QHL-2401')!.siteId;
});
afterAll(async () => {
  for (const u of units) await u.endAsync().catch(() => undefined);
  await stack?.stop();
});

/** A unit that answers every command: accepted then done, refused, or not at all. */
async function unitThatAnswers(serial: string, answer: 'done' | 'rejected' | 'silent'): Promise<void> {
  const u = await connectUnit(stack.broker.port, serial);
  units.push(u);
  await u.subscribeAsync(unitTopic(serial, 'commands'), { qos: 1 });
  u.on('message', (_t, payload) => {
    const c = JSON.parse(String(payload)) as Command;
    const ts = new Date().toISOString();
    if (answer === 'silent') return;
    const p =
      answer === 'rejected'
        ? publish(u, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'rejected', reason: 'detector tilt out of travel' })
        : publish(u, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'accepted' }).then(() =>
            publish(u, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'done' }),
          );
    p.catch(() => undefined);
  });
  await publish(u, serial, 'status', { v: 1, online: true, firmware: '2.4.1' }, true);
  await waitFor(() => stack.live.get(stack.units.get(serial)!.id)?.online, 3000, `${serial} online`);
}

describe('GET /api/sites/:id/detector-tilt', () => {
  it("judges twelve days of the year and finds the glass-facade roof's worst day beyond any detector tilt (scans instead)", async () => {
    const eng = (await as('engineer@saltmarsh.example')).agent;
    const r = (await eng.get(`/api/sites/${siteId}/detector-tilt?year=2026`).expect(200)).body as DetectorTiltRecommendation;
    expect(r).toMatchObject({ siteId, year: 2026, marginDeg: 2 });
    expect(r.days.map((d) => d.date)).toEqual(Array.from({ length: 12 }, (_, i) => `2026-${String(i + 1).padStart(2, '0')}-21`));
    // Hamburg: the sun is up about 7½ h on 21 December and about 17 h on 21 June (hourly instants while it is up).
    const daylight = (d: (typeof r.days)[number]) => d.instants + d.instantsTooDim;
    expect(daylight(r.days[11]!)).toBeGreaterThanOrEqual(7);
    expect(daylight(r.days[11]!)).toBeLessThanOrEqual(9);
    expect(daylight(r.days[5]!)).toBeGreaterThanOrEqual(16);
    expect(daylight(r.days[5]!)).toBeLessThanOrEqual(18);
    // The glass facade's reflection of the sun is a second peak too far from the first for any detector tilt units take
    // (45°) to merge at some bright instants of the worst day: no tilt helps there, so nothing is recommended (scans are).
    expect(r).toMatchObject({ minBestWm2: 150, maxDetectorTiltDeg: 45, recommendedDetectorTiltDeg: null, capped: false });
    expect(Math.max(...r.days.map((d) => d.maxPeaks))).toBeGreaterThanOrEqual(2);
    const worst = r.worstDay!;
    expect(r.days.map((d) => d.date)).toContain(worst.date);
    expect(worst.stepDeg).toBe(3);
    expect(worst.instantsWithoutSinglePeak).toBeGreaterThan(0);
    // Every 30 minutes on the worst day, not hourly; instants below the site's 150 W/m² trap threshold are left out.
    const coarse = r.days.find((d) => d.date === worst.date)!;
    expect(worst.instants + worst.instantsTooDim).toBeGreaterThan(coarse.instants + coarse.instantsTooDim);
    expect(worst.instantsTooDim).toBeGreaterThan(0);
    expect(r.units.map((u) => u.serial)).toEqual(['QHL-2401', 'QHL-2402', 'QHL-2403', 'QHL-2404', 'QHL-2405', 'QHL-2406']);
    expect(r.basis).toMatch(/Clear-sky model of the site survey .* 21st of each month of 2026/);

    // Another margin reuses the judged year: the same worst day.
    const none = (await eng.get(`/api/sites/${siteId}/detector-tilt?year=2026&marginDeg=0`).expect(200)).body as DetectorTiltRecommendation;
    expect(none.worstDay).toEqual(worst);
  });

  it('recommends the smallest tilt plus the margin where the year stays single-peaked (Eastfield Depot Yard, no facades)', async () => {
    const eng = (await as('engineer@saltmarsh.example')).agent;
    const yard = stack.units.get('QED-2401')!.siteId;
    const r = (await eng.get(`/api/sites/${yard}/detector-tilt?year=2026`).expect(200)).body as DetectorTiltRecommendation;
    expect(r.days.map((d) => d.maxPeaks)).toEqual(Array(12).fill(1));
    expect(r.worstDay).toMatchObject({ singlePeakDetectorTiltDeg: 0.5, instantsWithoutSinglePeak: 0 });
    expect(r.recommendedDetectorTiltDeg).toBe(2.5); // 0.5° (one peak already) + the 2° margin
    const wider = (await eng.get(`/api/sites/${yard}/detector-tilt?year=2026&marginDeg=3.2`).expect(200))
      .body as DetectorTiltRecommendation;
    expect(wider.recommendedDetectorTiltDeg).toBe(4); // 3.7° rounded up to the 0.5° grid
  });

  it('is for engineers and admins: technicians, crews and owners 403; an unknown site 404; bad input 400 naming the field', async () => {
    for (const email of ['tech1@saltmarsh.example', 'crew1@saltmarsh.example', 'owner@quillmoor.example'])
      await (await as(email)).agent.get(`/api/sites/${siteId}/detector-tilt`).expect(403);
    const eng = (await as('engineer@saltmarsh.example')).agent;
    await eng.get('/api/sites/999999/detector-tilt').expect(404);
    expect((await eng.get(`/api/sites/${siteId}/detector-tilt?year=1999`).expect(400)).body.error.fields).toEqual({
      year: 'Must be a year between 2000 and 2100.',
    });
    expect((await eng.get(`/api/sites/${siteId}/detector-tilt?marginDeg=11`).expect(400)).body.error.fields).toEqual({
      marginDeg: 'Must be between 0 and 10 °.',
    });
    expect((await eng.get(`/api/sites/${siteId}/detector-tilt?step=1`).expect(400)).body.error.fields).toEqual({ step: 'Unknown field.' });
  });
});

describe('POST /api/sites/:id/detector-tilt', () => {
  it('sends one audited configure command to every enabled unit and says how each answered', async () => {
    const admin = (await as('admin@saltmarsh.example')).agent;
    const eng = await as('engineer@saltmarsh.example');
    const id = (serial: string) => stack.units.get(serial)!.id;
    await admin
      .patch(`/api/units/${id('QHL-2406')}`)
      .send({ disabled: true })
      .expect(200);
    await unitThatAnswers('QHL-2401', 'done');
    await unitThatAnswers('QHL-2402', 'rejected');
    await unitThatAnswers('QHL-2403', 'silent');
    // A unit on maintenance hold still takes settings (they are not motion); QHL-2404 is held and offline.
    await eng.agent
      .post(`/api/units/${id('QHL-2404')}/commands`)
      .send({ kind: 'hold', note: 'Detector cleaning' })
      .expect(201);
    const auditBefore = Number((await stack.db('audit_log').where({ action: 'command' }).count({ n: '*' }).first())!.n);
    const tiltBefore = Object.fromEntries(
      (await stack.db('units').whereIn('serial', ['QHL-2401', 'QHL-2402']).select('serial', 'detector_tilt_deg')).map((u) => [
        u.serial,
        Number(u.detector_tilt_deg),
      ]),
    ) as Record<string, number>;

    const r = (await eng.agent.post(`/api/sites/${siteId}/detector-tilt`).send({ detectorTiltDeg: 14.5, confirm: true }).expect(200))
      .body as ApplyDetectorTiltResult;
    expect(r).toMatchObject({ siteId, detectorTiltDeg: 14.5 });
    const bySerial = Object.fromEntries(r.units.map((u) => [u.serial, u]));
    expect(Object.keys(bySerial).sort()).toEqual(['QHL-2401', 'QHL-2402', 'QHL-2403', 'QHL-2404', 'QHL-2405', 'QHL-2406']);
    expect(bySerial['QHL-2406']).toMatchObject({ status: 'skipped', commandId: null, reason: 'The unit is disabled: nothing was sent.' });
    for (const s of ['QHL-2401', 'QHL-2402', 'QHL-2403'])
      expect(['sent', 'acknowledged', 'completed', 'rejected']).toContain(bySerial[s]!.status);
    expect(bySerial['QHL-2404']!.status).toBe('queued');
    expect(bySerial['QHL-2405']!.status).toBe('queued');

    // The units' answers land on each command: done, refused, no answer (timed out), and the offline ones wait.
    const statusOf = async (serial: string) =>
      (await stack.db('commands').where({ id: bySerial[serial]!.commandId }).first('status')).status;
    await waitFor(async () => (await statusOf('QHL-2401')) === 'completed', 3000, 'QHL-2401 done');
    await waitFor(async () => (await statusOf('QHL-2402')) === 'rejected', 3000, 'QHL-2402 refused');
    await waitFor(async () => (await statusOf('QHL-2403')) === 'timed-out', 5000, 'QHL-2403 timed out');
    expect(await statusOf('QHL-2404')).toBe('queued');
    // A unit that carried the settings out is recorded with its new detector tilt (what the trap detector and the
    // scans judge it by); one that refused keeps its old one.
    const tiltOf = async (serial: string) =>
      Number((await stack.db('units').where({ serial }).first('detector_tilt_deg')).detector_tilt_deg);
    await waitFor(async () => (await tiltOf('QHL-2401')) === 14.5, 3000, 'QHL-2401 recorded with its new tilt');
    expect(await tiltOf('QHL-2402')).toBe(tiltBefore['QHL-2402']);
    expect(stack.units.get('QHL-2401')!.detectorTiltDeg).toBe(14.5);
    const recorded = await stack
      .db('audit_log')
      .where({ action: 'unit-configured', target: `unit:${id('QHL-2401')}` })
      .first('user_id', 'detail');
    expect(recorded.user_id).toBe(eng.userId);
    expect(typeof recorded.detail === 'string' ? JSON.parse(recorded.detail) : recorded.detail).toMatchObject({
      commandId: bySerial['QHL-2401']!.commandId,
      detectorTiltDeg: { from: tiltBefore['QHL-2401'], to: 14.5 },
    });
    const sent = await stack.db('commands').where({ id: bySerial['QHL-2401']!.commandId }).first('kind', 'params', 'issued_by');
    expect(sent.kind).toBe('configure');
    expect(typeof sent.params === 'string' ? JSON.parse(sent.params) : sent.params).toEqual({ config: { detectorTiltDeg: 14.5 } });
    expect(sent.issued_by).toBe(eng.userId);

    const auditAfter = Number((await stack.db('audit_log').where({ action: 'command' }).count({ n: '*' }).first())!.n);
    expect(auditAfter - auditBefore).toBe(5); // one per command sent, none for the disabled unit
    const summary = await stack.db('audit_log').where({ action: 'detector-tilt-apply' }).orderBy('id', 'desc').first();
    expect(summary).toMatchObject({ user_id: eng.userId, target: `site:${siteId}` });
    const detail = typeof summary.detail === 'string' ? JSON.parse(summary.detail) : summary.detail;
    expect(detail).toEqual({
      detectorTiltDeg: 14.5,
      sent: ['QHL-2401', 'QHL-2402', 'QHL-2403', 'QHL-2404', 'QHL-2405'],
      notSent: ['QHL-2406'],
    });
  });

  it('refuses without confirmation or outside what units take (naming the field), sending nothing; roles as for the recommendation', async () => {
    const eng = (await as('engineer@saltmarsh.example')).agent;
    const count = async () => Number((await stack.db('commands').count({ n: '*' }).first())!.n);
    const before = await count();
    const noConfirm = await eng.post(`/api/sites/${siteId}/detector-tilt`).send({ detectorTiltDeg: 12 }).expect(400);
    expect(Object.keys(noConfirm.body.error.fields)).toEqual(['confirm']);
    const tooSteep = await eng.post(`/api/sites/${siteId}/detector-tilt`).send({ detectorTiltDeg: 50, confirm: true }).expect(400);
    expect(tooSteep.body.error.fields).toEqual({ detectorTiltDeg: 'Must be between 0.5 and 45 °.' });
    const extra = await eng.post(`/api/sites/${siteId}/detector-tilt`).send({ detectorTiltDeg: 12, confirm: true, gain: 2 }).expect(400);
    expect(extra.body.error.fields).toEqual({ gain: 'Unknown field.' });
    await eng.post('/api/sites/999999/detector-tilt').send({ detectorTiltDeg: 12, confirm: true }).expect(404);
    for (const email of ['tech1@saltmarsh.example', 'crew1@saltmarsh.example', 'owner@quillmoor.example'])
      await (await as(email)).agent.post(`/api/sites/${siteId}/detector-tilt`).send({ detectorTiltDeg: 12, confirm: true }).expect(403);
    expect(await count()).toBe(before);
  });
});
