import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import WebSocket from 'ws';
import type { MqttClient } from 'mqtt';
import { startTestStack } from '../helpers/test-stack';
import { connectUnit, publish, sample, waitFor } from '../helpers/fake-unit';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import { unitTopic } from '../../shared/contracts/topics';
import type { LiveServerMessage } from '../../shared/contracts/live';
import type { Command } from '../../shared/contracts/wire';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { ingest: { flushMs: 20 }, commands: { ackTimeoutMs: 300 } } });
});
afterAll(async () => {
  await stack?.stop();
});

async function signIn(email: string) {
  const agent = request.agent(stack.http);
  const res = await agent.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  const cookie = String(res.headers['set-cookie']).split(';')[0]!;
  return { agent, cookie };
}

function openSocket(cookie?: string): Promise<{ ws: WebSocket; messages: LiveServerMessage[] }> {
  const ws = new WebSocket(`${stack.url.replace('http', 'ws')}/ws`, { headers: cookie ? { Cookie: cookie } : {} });
  const messages: LiveServerMessage[] = [];
  ws.on('message', (d) => messages.push(JSON.parse(String(d))));
  return new Promise((res, rej) => {
    ws.once('open', () => res({ ws, messages }));
    ws.once('unexpected-response', (_req, r) => rej(new Error(`HTTP ${r.statusCode}`)));
    ws.once('error', rej);
  });
}

/** A unit that answers commands the way the test says (accepted then done, or rejected). */
async function obedientUnit(serial: string, answer: (c: Command) => 'done' | 'rejected' | 'silent' = () => 'done'): Promise<MqttClient> {
  const u = await connectUnit(stack.broker.port, serial);
  await u.subscribeAsync(unitTopic(serial, 'commands'), { qos: 1 });
  u.on('message', (_t, payload) => {
    const c = JSON.parse(String(payload)) as Command;
    const a = answer(c);
    if (a === 'silent') return;
    const ts = new Date().toISOString();
    const answered =
      a === 'rejected'
        ? publish(u, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'rejected', reason: 'limit switch active' })
        : publish(u, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'accepted' }).then(() =>
            publish(u, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'done' }),
          );
    answered.catch(() => undefined); // the test may already have disconnected the unit
  });
  await publish(u, serial, 'status', { v: 1, online: true, firmware: '2.4.1' }, true);
  await waitFor(() => stack.live.get(stack.units.get(serial)!.id)?.online, 3000, `${serial} online`);
  return u;
}

describe('live WebSocket', () => {
  it('refuses an upgrade without a session (401)', async () => {
    await expect(openSocket()).rejects.toThrow('HTTP 401');
    await expect(openSocket('bw_session=forged.token.value')).rejects.toThrow('HTTP 401');
  });

  it('sends a snapshot on subscribe and coalesced unit updates after', async () => {
    const { cookie } = await signIn('tech1@saltmarsh.example');
    const { ws, messages } = await openSocket(cookie);
    const site = stack.units.get('QHL-2401')!.siteId;
    ws.send(JSON.stringify({ type: 'subscribe', siteId: site }));
    const snap = await waitFor(() => messages.find((m) => m.type === 'snapshot'), 3000, 'snapshot');
    expect(snap.type === 'snapshot' && snap.units.map((u) => u.serial).sort()).toEqual([
      'QHL-2401',
      'QHL-2402',
      'QHL-2403',
      'QHL-2404',
      'QHL-2405',
      'QHL-2406',
    ]);

    const u = await connectUnit(stack.broker.port, 'QHL-2401');
    const t0 = Date.now() - 5000;
    // Sent together (QoS 1 in flight at once), so all five arrive within one coalescing window even on a busy machine.
    await Promise.all(
      Array.from({ length: 5 }, (_, i) => publish(u, 'QHL-2401', 'telemetry', sample(i, t0 + i * 1000, { poaWm2: 700 + i }))),
    );
    const updatesOf = (serial: string) => messages.flatMap((m) => (m.type === 'units' ? m.units.filter((u) => u.serial === serial) : []));
    const first = await waitFor(() => updatesOf('QHL-2401')[0], 3000, 'unit update');
    expect(first.online).toBe(true);
    // Five reports inside one coalescing window arrive as at most two pushes, the last carrying the newest values.
    await new Promise((r) => setTimeout(r, 1300));
    const updates = updatesOf('QHL-2401');
    expect(updates.length).toBeLessThanOrEqual(2);
    expect(updates.at(-1)!.poaWm2).toBe(704);
    ws.close();
    await u.endAsync();
  });

  it("scopes an owner's socket to that owner's units", async () => {
    const { cookie } = await signIn('owner@fenwicklane.example');
    const { ws, messages } = await openSocket(cookie);
    ws.send(JSON.stringify({ type: 'subscribe', fleet: true }));
    const snap = await waitFor(() => messages.find((m) => m.type === 'snapshot'), 3000, 'snapshot');
    expect(snap.type === 'snapshot' && new Set(snap.units.map((u) => u.serial.slice(0, 3)))).toEqual(new Set(['FSC', 'FGA']));
    ws.send(JSON.stringify({ type: 'subscribe', siteId: stack.units.get('QHL-2401')!.siteId }));
    const err = await waitFor(() => messages.find((m) => m.type === 'error'), 3000, 'error');
    expect(err).toMatchObject({ type: 'error', code: 'not_found' });
    // Updates of another owner's unit never reach this socket.
    const u = await connectUnit(stack.broker.port, 'QHL-2402');
    await publish(u, 'QHL-2402', 'telemetry', sample(1, Date.now()));
    await new Promise((r) => setTimeout(r, 1300));
    expect(messages.some((m) => m.type === 'units' && m.units.some((u) => u.serial === 'QHL-2402'))).toBe(false);
    ws.close();
    await u.endAsync();
  });
});

describe('commands', () => {
  it('tracks queued → sent → acknowledged → completed, attributes and pushes each change', async () => {
    const serial = 'QED-2401';
    const id = stack.units.get(serial)!.id;
    const u = await obedientUnit(serial);
    const { agent, cookie } = await signIn('tech2@saltmarsh.example');
    const { ws, messages } = await openSocket(cookie);
    ws.send(JSON.stringify({ type: 'subscribe', unitId: id }));
    await waitFor(() => messages.find((m) => m.type === 'snapshot'), 3000, 'snapshot');
    const res = await agent
      .post(`/api/units/${id}/commands`)
      .send({ kind: 'goto', tiltDeg: 30, azimuthDeg: 200, confirm: true })
      .expect(201);
    expect(res.body).toMatchObject({
      kind: 'goto',
      status: 'sent',
      params: { tiltDeg: 30, azimuthDeg: 200 },
      issuedBy: { name: 'Tomasz Velde' },
    });
    const done = await waitFor(
      async () =>
        (await agent.get(`/api/units/${id}/commands`)).body.find(
          (c: { id: string; status: string }) => c.id === res.body.id && c.status === 'completed',
        ),
      3000,
      'completed',
    );
    expect(done.ackedAt).not.toBeNull();
    expect(done.finishedAt).not.toBeNull();
    const pushed = () => messages.flatMap((m) => (m.type === 'command' && m.command.id === res.body.id ? [m.command.status] : []));
    await waitFor(() => pushed().includes('completed'), 2000, 'the completed push');
    expect(pushed()).toEqual(['sent', 'acknowledged', 'completed']);
    const audit = await stack.db('audit_log').where({ action: 'command', target: `unit:${id}` });
    expect(audit).toHaveLength(1);
    ws.close();
    await u.endAsync();
  });

  it('records a rejection and times out an unanswered command', async () => {
    const serial = 'QED-2402';
    const id = stack.units.get(serial)!.id;
    let mode: 'rejected' | 'silent' = 'rejected';
    const u = await obedientUnit(serial, () => mode);
    const { agent } = await signIn('engineer@saltmarsh.example');
    const a = await agent.post(`/api/units/${id}/commands`).send({ kind: 'scan', confirm: true }).expect(201);
    await waitFor(
      async () =>
        (await agent.get(`/api/units/${id}/commands`)).body.find(
          (c: { id: string; status: string; reason: string }) =>
            c.id === a.body.id && c.status === 'rejected' && c.reason === 'limit switch active',
        ),
      3000,
      'rejected',
    );
    mode = 'silent';
    const b = await agent
      .post(`/api/units/${id}/commands`)
      .send({ kind: 'configure', config: { gain: 0.5 }, confirm: true })
      .expect(201);
    await waitFor(
      async () =>
        (await agent.get(`/api/units/${id}/commands`)).body.find(
          (c: { id: string; status: string }) => c.id === b.body.id && c.status === 'timed-out',
        ),
      4000,
      'timed out',
    );
    await u.endAsync();
  });

  it('refuses motion to a unit on maintenance hold until the hold is released; crews may hold, not move', async () => {
    const serial = 'QED-2403';
    const id = stack.units.get(serial)!.id;
    const u = await obedientUnit(serial);
    const crew = (await signIn('crew2@saltmarsh.example')).agent;
    const tech = (await signIn('tech1@saltmarsh.example')).agent;
    expect((await crew.post(`/api/units/${id}/commands`).send({ kind: 'stow', confirm: true })).status).toBe(403);
    // In force as soon as it is stored, before the unit has answered.
    await crew.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    const refused = await tech.post(`/api/units/${id}/commands`).send({ kind: 'goto', tiltDeg: 10, azimuthDeg: 180, confirm: true });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('unit_on_hold');
    const sentBefore = (await tech.get(`/api/units/${id}/commands`)).body.length;
    expect(sentBefore).toBe(1); // the refused command was never stored or sent
    await crew.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', confirm: true }).expect(201);
    await waitFor(
      async () =>
        (await tech.get(`/api/units/${id}/commands`)).body.find(
          (c: { kind: string; status: string }) => c.kind === 'release-hold' && c.status === 'completed',
        ),
      3000,
      'release carried out',
    );
    expect((await tech.get(`/api/units/${id}/holds`)).body.held).toBe(false);
    await tech.post(`/api/units/${id}/commands`).send({ kind: 'goto', tiltDeg: 10, azimuthDeg: 180, confirm: true }).expect(201);
    await u.endAsync();
  });

  it('demands confirmation for motion, parameters for go to, and keeps owners out', async () => {
    const id = stack.units.get('FSC-2402')!.id;
    const tech = (await signIn('tech1@saltmarsh.example')).agent;
    const a = await tech.post(`/api/units/${id}/commands`).send({ kind: 'stow' });
    expect(a.status).toBe(400);
    expect(a.body.error.fields).toEqual({ confirm: 'Must be true for a command that moves the unit.' });
    const b = await tech.post(`/api/units/${id}/commands`).send({ kind: 'goto', confirm: true });
    expect(b.body.error.fields).toEqual({ tiltDeg: 'Required for go to.', azimuthDeg: 'Required for go to.' });
    const c = await tech.post(`/api/units/${id}/commands`).send({ kind: 'dance', confirm: true });
    expect(c.body.error.fields.kind).toMatch(/Must be one of scan, goto/);
    const owner = (await signIn('owner@fenwicklane.example')).agent;
    expect((await owner.post(`/api/units/${id}/commands`).send({ kind: 'hold' })).status).toBe(403);
    const other = (await signIn('owner@quillmoor.example')).agent;
    expect((await other.get(`/api/units/${id}/commands`)).status).toBe(404);
  });

  it('queues a command for an offline unit and sends it when the unit comes online', async () => {
    const serial = 'FSC-2403';
    const id = stack.units.get(serial)!.id;
    const tech = (await signIn('tech1@saltmarsh.example')).agent;
    const res = await tech
      .post(`/api/units/${id}/commands`)
      .send({ kind: 'configure', config: { deadbandWm2: 4 }, confirm: true })
      .expect(201);
    expect(res.body.status).toBe('queued');
    const u = await obedientUnit(serial);
    await waitFor(
      async () =>
        (await tech.get(`/api/units/${id}/commands`)).body.find(
          (c: { id: string; status: string }) => c.id === res.body.id && c.status === 'completed',
        ),
      3000,
      'completed after coming online',
    ).catch(async (e) => {
      console.log(JSON.stringify((await tech.get(`/api/units/${id}/commands`)).body));
      throw e;
    });
    await u.endAsync();
  });
});
