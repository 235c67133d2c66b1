import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import WebSocket from 'ws';
import type { MqttClient } from 'mqtt';
import { startTestStack } from '../helpers/test-stack';
import { connectUnit, publish, sample, waitFor } from '../helpers/fake-unit';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import { unitTopic } from '../../shared/contracts/topics';
import type { CommandView, LiveServerMessage } from '../../shared/contracts/live';
import type { UnitHolds } from '../../shared/contracts/holds';
import type { Command } from '../../shared/contracts/wire';

const QUEUE_TIMEOUT_MS = 10 * 60_000;
/** Added to the command service's clock: lets a test see what happens after the queue timeout without waiting for it. */
let clockOffsetMs = 0;
let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({
    seed: true,
    stack: { ingest: { flushMs: 20 }, commands: { queueTimeoutMs: QUEUE_TIMEOUT_MS, now: () => Date.now() + clockOffsetMs } },
  });
});
afterAll(async () => {
  await stack?.stop();
});
afterEach(() => {
  clockOffsetMs = 0;
});

type Agent = ReturnType<typeof request.agent>;

async function signIn(email: string): Promise<{ agent: Agent; cookie: string; userId: number }> {
  const agent = request.agent(stack.http);
  const res = await agent.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  const cookie = String(res.headers['set-cookie']).split(';')[0]!;
  const me = await agent.get('/api/me').expect(200);
  return { agent, cookie, userId: me.body.id };
}

const unitId = (serial: string) => stack.units.get(serial)!.id;
const commandsOf = async (agent: Agent, id: number): Promise<CommandView[]> =>
  (await agent.get(`/api/units/${id}/commands`).expect(200)).body;
const holdsOf = async (agent: Agent, id: number): Promise<UnitHolds> => (await agent.get(`/api/units/${id}/holds`).expect(200)).body;

/** A unit that answers every command accepted → done and remembers what it received, in arrival order. */
async function recordingUnit(serial: string): Promise<{ client: MqttClient; received: Command[] }> {
  const client = await connectUnit(stack.broker.port, serial);
  const received: Command[] = [];
  await client.subscribeAsync(unitTopic(serial, 'commands'), { qos: 1 });
  client.on('message', (_t, payload) => {
    const c = JSON.parse(String(payload)) as Command;
    received.push(c);
    const ts = new Date().toISOString();
    publish(client, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'accepted' })
      .then(() => publish(client, serial, 'acks', { v: 1, commandId: c.commandId, ts, result: 'done' }))
      .catch(() => undefined); // the test may already have disconnected the unit
  });
  await publish(client, serial, 'status', { v: 1, online: true, firmware: '2.4.1' }, true);
  await waitFor(() => stack.live.get(unitId(serial))?.online, 3000, `${serial} online`);
  return { client, received };
}

function openSocket(cookie: string): Promise<{ ws: WebSocket; messages: LiveServerMessage[] }> {
  const ws = new WebSocket(`${stack.url.replace('http', 'ws')}/ws`, { headers: { Cookie: cookie } });
  const messages: LiveServerMessage[] = [];
  ws.on('message', (d) => messages.push(JSON.parse(String(d))));
  return new Promise((res, rej) => {
    ws.once('open', () => res({ ws, messages }));
    ws.once('error', rej);
  });
}

const GOTO = { kind: 'goto', tiltDeg: 20, azimuthDeg: 180, confirm: true } as const;

describe('a hold is in force the moment it is requested', () => {
  it('refuses a confirmed go-to for an offline unit whose hold is only queued, and the unit gets only the hold', async () => {
    const id = unitId('QHL-2403');
    const crew = await signIn('crew1@saltmarsh.example');
    const tech = await signIn('tech1@saltmarsh.example');
    const hold = await crew.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    expect(hold.body).toMatchObject({ kind: 'hold', status: 'queued' });

    const refused = await tech.agent.post(`/api/units/${id}/commands`).send(GOTO);
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('unit_on_hold');
    expect(refused.body.error.message).toContain('Ines Calder');
    expect((await commandsOf(tech.agent, id)).map((c) => c.kind)).toEqual(['hold']);
    expect(hold.body.expiresAt).toBeNull();

    const holds = await holdsOf(tech.agent, id);
    expect(holds.held).toBe(true);
    expect(holds.active).toHaveLength(1);
    expect(holds.active[0]).toMatchObject({
      holder: { kind: 'person', id: crew.userId, name: 'Ines Calder' },
      note: null,
      placedBy: { name: 'Ines Calder' },
      releasedAt: null,
    });
    const live = stack.live.get(id)!;
    expect(live.onHold).toBe(true);
    expect(live.holds.map((h) => h.holder.name)).toEqual(['Ines Calder']);

    const unit = await recordingUnit('QHL-2403');
    await waitFor(async () => (await commandsOf(tech.agent, id)).find((c) => c.status === 'completed'), 3000, 'hold delivered');
    expect(unit.received.map((c) => c.kind)).toEqual(['hold']);
    await unit.client.endAsync();
  });

  it('cancels motion already queued for the unit, naming the hold, and keeps other queued commands', async () => {
    const id = unitId('QHL-2404');
    const tech = await signIn('tech2@saltmarsh.example');
    const crew = await signIn('crew2@saltmarsh.example');
    const stow = await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'stow', confirm: true }).expect(201);
    const go = await tech.agent.post(`/api/units/${id}/commands`).send(GOTO).expect(201);
    const conf = await tech.agent
      .post(`/api/units/${id}/commands`)
      .send({ kind: 'configure', config: { gain: 0.7 }, confirm: true })
      .expect(201);
    expect([stow.body.status, go.body.status, conf.body.status]).toEqual(['queued', 'queued', 'queued']);
    await crew.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);

    const byId = new Map((await commandsOf(tech.agent, id)).map((c) => [c.id, c]));
    for (const c of [byId.get(stow.body.id)!, byId.get(go.body.id)!]) {
      expect(c.status).toBe('cancelled');
      expect(c.reason).toMatch(/maintenance hold.*Kwame Ruiz/);
      expect(c.finishedAt).not.toBeNull();
    }
    expect(byId.get(conf.body.id)!.status).toBe('queued');

    const unit = await recordingUnit('QHL-2404');
    await waitFor(() => unit.received.length >= 2, 3000, 'queued commands delivered');
    expect(unit.received.map((c) => c.kind)).toEqual(['configure', 'hold']);
    await unit.client.endAsync();
  });
});

describe('queued commands', () => {
  it('go out in the order issued, also when they were issued within the same millisecond', async () => {
    const id = unitId('QHL-2405');
    const tech = await signIn('tech1@saltmarsh.example');
    const gains = [1, 2, 3, 4, 5, 6, 7, 8];
    for (const gain of gains)
      await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'configure', config: { gain }, confirm: true }).expect(201);
    // Same issue time for all of them: only the tie-breaker keeps their order.
    await stack.db('commands').where({ unit_id: id }).update({ issued_at: new Date() });
    const unit = await recordingUnit('QHL-2405');
    await waitFor(() => unit.received.length === gains.length, 3000, 'all queued commands delivered');
    expect(unit.received.map((c) => c.config?.gain)).toEqual(gains);
    await unit.client.endAsync();
  });

  it('motion queued for an offline unit says when it expires and times out then; a queued hold does not expire', async () => {
    const id = unitId('QHL-2406');
    const tech = await signIn('tech2@saltmarsh.example');
    const stow = await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'stow', confirm: true }).expect(201);
    expect(stow.body.status).toBe('queued');
    expect(Date.parse(stow.body.expiresAt) - Date.parse(stow.body.issuedAt)).toBe(QUEUE_TIMEOUT_MS);

    clockOffsetMs = QUEUE_TIMEOUT_MS + 1000;
    await stack.commands.sweep();
    const expired = (await commandsOf(tech.agent, id)).find((c) => c.id === stow.body.id)!;
    expect(expired).toMatchObject({ status: 'timed-out', reason: 'unit stayed offline' });

    const hold = await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    clockOffsetMs += QUEUE_TIMEOUT_MS + 1000;
    await stack.commands.sweep();
    expect((await commandsOf(tech.agent, id)).find((c) => c.id === hold.body.id)!.status).toBe('queued');
  });
});

describe('a hold that did not get through', () => {
  it('is sent again when the unit comes back online', async () => {
    const serial = 'QED-2406';
    const id = unitId(serial);
    const silent = await connectUnit(stack.broker.port, serial);
    await publish(silent, serial, 'status', { v: 1, online: true }, true);
    await waitFor(() => stack.live.get(id)?.online, 3000, `${serial} online`);
    const crew = await signIn('crew2@saltmarsh.example');
    const hold = await crew.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    expect(hold.body.status).toBe('sent');
    await silent.endAsync(true); // gone without answering; its will marks it offline
    await waitFor(() => stack.live.get(id)?.online === false, 3000, `${serial} offline`);
    clockOffsetMs = 60_000;
    await stack.commands.sweep();
    expect((await commandsOf(crew.agent, id)).find((c) => c.id === hold.body.id)!.status).toBe('timed-out');
    clockOffsetMs = 0;

    const unit = await recordingUnit(serial);
    await waitFor(() => unit.received.length === 1, 3000, 'hold sent again');
    expect(unit.received[0]!.kind).toBe('hold');
    const again = (await commandsOf(crew.agent, id)).find((c) => c.id === unit.received[0]!.commandId)!;
    expect(again.issuedBy.name).toBe('Kwame Ruiz');
    await unit.client.endAsync();
  });
});

describe('several holders', () => {
  it('keeps the unit held until the last hold is released; only the first hold and the last release reach the unit', async () => {
    const serial = 'QED-2404';
    const id = unitId(serial);
    const unit = await recordingUnit(serial);
    const ines = await signIn('crew1@saltmarsh.example');
    const kwame = await signIn('crew2@saltmarsh.example');
    const tech = await signIn('tech1@saltmarsh.example');

    // Published to the unit: the answer may already say the unit acknowledged it (it answers at once).
    const reachedUnit = ['sent', 'acknowledged', 'completed'];
    const first = await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold', note: 'Gearbox inspection' }).expect(201);
    expect(reachedUnit).toContain(first.body.status);
    expect(first.body.sentAt).not.toBeNull();
    await waitFor(() => unit.received.length === 1, 3000, 'hold sent');
    const second = await kwame.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold', note: 'Cleaning the detectors' }).expect(201);
    expect(second.body).toMatchObject({ kind: 'hold', status: 'completed', sentAt: null });
    expect(second.body.reason).toMatch(/already/);
    expect((await holdsOf(tech.agent, id)).active.map((h) => h.holder.name)).toEqual(['Ines Calder', 'Kwame Ruiz']);
    await waitFor(() => stack.live.get(id)!.holds.length === 2, 3000, 'both holders in the live state');

    // A second hold by the same person is refused: the first one already holds the unit.
    expect((await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' })).body.error.code).toBe('already_holding');

    const r1 = await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', confirm: true }).expect(201);
    expect(r1.body).toMatchObject({ kind: 'release-hold', status: 'completed', sentAt: null });
    const stillHeld = await tech.agent.post(`/api/units/${id}/commands`).send(GOTO);
    expect(stillHeld.status).toBe(409);
    expect(stillHeld.body.error.message).toContain('Kwame Ruiz');
    expect(stillHeld.body.error.message).not.toContain('Ines Calder');

    const r2 = await kwame.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', confirm: true }).expect(201);
    expect(reachedUnit).toContain(r2.body.status);
    expect(r2.body.sentAt).not.toBeNull();
    await waitFor(
      async () => (await commandsOf(tech.agent, id)).find((c) => c.id === r2.body.id && c.status === 'completed'),
      3000,
      'release done',
    );
    expect(stack.live.get(id)!.onHold).toBe(false);
    await tech.agent.post(`/api/units/${id}/commands`).send(GOTO).expect(201);
    await waitFor(() => unit.received.length === 3, 3000, 'go-to sent');
    expect(unit.received.map((c) => c.kind)).toEqual(['hold', 'release-hold', 'goto']);

    const released = (await holdsOf(tech.agent, id)).released;
    expect(released.map((h) => [h.holder.name, h.releasedBy?.name])).toEqual(
      expect.arrayContaining([
        ['Ines Calder', 'Ines Calder'],
        ['Kwame Ruiz', 'Kwame Ruiz'],
      ]),
    );
    await unit.client.endAsync();
  });

  it("lets only the holder release a person's hold; an admin releases it giving a reason", async () => {
    const id = unitId('FSC-2404');
    const ines = await signIn('crew1@saltmarsh.example');
    const kwame = await signIn('crew2@saltmarsh.example');
    const tech = await signIn('tech2@saltmarsh.example');
    const admin = await signIn('admin@saltmarsh.example');
    await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    const notHis = await kwame.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', confirm: true });
    expect(notHis.status).toBe(409);
    expect(notHis.body.error.code).toBe('no_own_hold');

    const holdId = (await holdsOf(admin.agent, id)).active[0]!.id;
    expect(
      (await kwame.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', holdId, reason: 'done', confirm: true })).status,
    ).toBe(403);
    expect(
      (await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', holdId, reason: 'done', confirm: true })).status,
    ).toBe(403);
    const noReason = await admin.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold', holdId, confirm: true });
    expect(noReason.status).toBe(400);
    expect(Object.keys(noReason.body.error.fields)).toEqual(['reason']);
    expect((await holdsOf(admin.agent, id)).held).toBe(true);

    await admin.agent
      .post(`/api/units/${id}/commands`)
      .send({ kind: 'release-hold', holdId, reason: 'Crew left site without releasing; confirmed by phone', confirm: true })
      .expect(201);
    const after = await holdsOf(tech.agent, id);
    expect(after.held).toBe(false);
    expect(after.released[0]).toMatchObject({
      id: holdId,
      holder: { name: 'Ines Calder' },
      releasedBy: { name: 'Ada Kestrel' },
      releaseReason: 'Crew left site without releasing; confirmed by phone',
    });
    const audit = await stack.db('audit_log').where({ action: 'hold-release', target: `unit:${id}` });
    expect(audit).toHaveLength(1);
    expect(audit[0].user_id).toBe(admin.userId);
  });

  it('needs confirm: true for release-hold and configure, naming confirm', async () => {
    const id = unitId('FSC-2405');
    const ines = await signIn('crew1@saltmarsh.example');
    const tech = await signIn('tech1@saltmarsh.example');
    await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    const release = await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'release-hold' });
    expect(release.status).toBe(400);
    expect(Object.keys(release.body.error.fields)).toEqual(['confirm']);
    const configure = await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'configure', config: { gain: 2 } });
    expect(configure.status).toBe(400);
    expect(Object.keys(configure.body.error.fields)).toEqual(['confirm']);
    expect((await holdsOf(tech.agent, id)).held).toBe(true);
  });

  it("shows a unit's holds only to those who may see the unit", async () => {
    const id = unitId('FSC-2406');
    await (await signIn('crew2@saltmarsh.example')).agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    const own = await holdsOf((await signIn('owner@fenwicklane.example')).agent, id);
    expect(own.active.map((h) => h.holder.name)).toEqual(['Kwame Ruiz']);
    expect((await (await signIn('owner@quillmoor.example')).agent.get(`/api/units/${id}/holds`)).status).toBe(404);
    expect((await (await signIn('tech1@saltmarsh.example')).agent.get('/api/units/999999/holds')).status).toBe(404);
  });
});

describe('unit directory stays fresh after admin changes', () => {
  it('takes commands for a newly registered unit at once', async () => {
    const admin = await signIn('admin@saltmarsh.example');
    const siteId = stack.units.get('QHL-2401')!.siteId;
    const created = await admin.agent
      .post('/api/units')
      .send({
        serial: 'QHL-2490',
        siteId,
        ratedPowerWp: 420,
        detectorTiltDeg: 8,
        tiltMinDeg: 0,
        tiltMaxDeg: 85,
        azimuthMinDeg: 60,
        azimuthMaxDeg: 300,
        planXM: 40,
        planYM: 12,
        firmware: '2.4.1',
      })
      .expect(201);
    const tech = await signIn('tech1@saltmarsh.example');
    const res = await tech.agent.post(`/api/units/${created.body.unit.id}/commands`).send({ kind: 'stow', confirm: true });
    expect(res.status).toBe(201);
    expect(res.body.status).toBe('queued');
  });

  it('follows a unit to its new owner at once: command list and live stream', async () => {
    const serial = 'FGA-2401';
    const id = unitId(serial);
    const admin = await signIn('admin@saltmarsh.example');
    const fenwick = await signIn('owner@fenwicklane.example');
    const quillmoor = await signIn('owner@quillmoor.example');
    expect((await fenwick.agent.get(`/api/units/${id}/commands`)).status).toBe(200);
    const oldSock = await openSocket(fenwick.cookie);
    const newSock = await openSocket(quillmoor.cookie);
    for (const s of [oldSock, newSock]) {
      s.ws.send(JSON.stringify({ type: 'subscribe', fleet: true }));
      await waitFor(() => s.messages.find((m) => m.type === 'snapshot'), 3000, 'snapshot');
    }

    await admin.agent
      .patch(`/api/units/${id}`)
      .send({ siteId: stack.units.get('QHL-2401')!.siteId })
      .expect(200);
    expect((await fenwick.agent.get(`/api/units/${id}/commands`)).status).toBe(404);
    expect((await quillmoor.agent.get(`/api/units/${id}/commands`)).status).toBe(200);

    const moved = await connectUnit(stack.broker.port, serial);
    const stayed = await connectUnit(stack.broker.port, 'FGA-2402');
    await publish(moved, serial, 'telemetry', sample(1, Date.now()));
    await waitFor(
      () => newSock.messages.some((m) => m.type === 'units' && m.units.some((u) => u.serial === serial)),
      3000,
      'new owner gets the moved unit',
    );
    // A report of a unit the old owner still has, sent after: once it arrives, anything about the moved unit would have too.
    await publish(stayed, 'FGA-2402', 'telemetry', sample(1, Date.now()));
    await waitFor(
      () => oldSock.messages.some((m) => m.type === 'units' && m.units.some((u) => u.serial === 'FGA-2402')),
      3000,
      'old owner gets its own unit',
    );
    expect(oldSock.messages.some((m) => m.type === 'units' && m.units.some((u) => u.serial === serial))).toBe(false);
    const state = newSock.messages.flatMap((m) => (m.type === 'units' ? m.units : [])).find((u) => u.serial === serial)!;
    expect(state.siteId).toBe(stack.units.get('QHL-2401')!.siteId);
    for (const s of [oldSock, newSock]) s.ws.close();
    await moved.endAsync();
    await stayed.endAsync();
  });

  it('follows a whole site to its new owner at once', async () => {
    const id = unitId('FGA-2403');
    const admin = await signIn('admin@saltmarsh.example');
    const fenwick = await signIn('owner@fenwicklane.example');
    const quillmoor = await signIn('owner@quillmoor.example');
    const quillmoorId = (await admin.agent.get('/api/owners').expect(200)).body.find(
      (o: { name: string }) => o.name === 'Quillmoor Energy Cooperative',
    ).id;
    await admin.agent
      .patch(`/api/sites/${stack.units.get('FGA-2403')!.siteId}`)
      .send({ ownerId: quillmoorId })
      .expect(200);
    expect((await fenwick.agent.get(`/api/units/${id}/commands`)).status).toBe(404);
    expect((await quillmoor.agent.get(`/api/units/${id}/commands`)).status).toBe(200);
    expect(stack.units.byUnitId(id)!.ownerId).toBe(quillmoorId);
  });

  it('knows a disabled unit and a new serial at once', async () => {
    const id = unitId('QED-2405');
    const admin = await signIn('admin@saltmarsh.example');
    await admin.agent.patch(`/api/units/${id}`).send({ disabled: true }).expect(200);
    expect(stack.units.byUnitId(id)!.disabled).toBe(true);
    await admin.agent.patch(`/api/units/${id}`).send({ serial: 'QED-2495' }).expect(200);
    expect(stack.units.get('QED-2495')?.id).toBe(id);
  });
});

describe('refused commands', () => {
  it('are each written to the audit log with the kind, the reason code and who asked', async () => {
    const id = unitId('FSC-2401');
    const owner = await signIn('owner@fenwicklane.example');
    const ines = await signIn('crew1@saltmarsh.example');
    const tech = await signIn('tech2@saltmarsh.example');
    expect((await owner.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' })).status).toBe(403);
    expect((await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'stow', confirm: true })).status).toBe(403);
    expect((await tech.agent.post(`/api/units/${id}/commands`).send({ kind: 'stow' })).status).toBe(400);
    const refusals = async () =>
      (
        await stack
          .db('audit_log')
          .where({ action: 'command-refused', target: `unit:${id}` })
          .orderBy('id')
      ).map((r) => ({ userId: r.user_id, ...(typeof r.detail === 'string' ? JSON.parse(r.detail) : r.detail) }));
    expect((await refusals()).map((r) => [r.userId, r.kind, r.status, r.code])).toEqual([
      [owner.userId, 'hold', 403, 'forbidden'],
      [ines.userId, 'stow', 403, 'forbidden'],
      [tech.userId, 'stow', 400, 'validation_failed'],
    ]);
    expect((await refusals())[2].fields).toHaveProperty('confirm');

    await ines.agent.post(`/api/units/${id}/commands`).send({ kind: 'hold' }).expect(201);
    expect((await tech.agent.post(`/api/units/${id}/commands`).send(GOTO)).status).toBe(409);
    expect((await refusals()).map((r) => [r.userId, r.kind, r.status, r.code]).at(-1)).toEqual([tech.userId, 'goto', 409, 'unit_on_hold']);
  });
});
