import { afterEach, describe, expect, it } from 'vitest';
import { startBroker, type BrokerOptions, type RunningBroker } from '../../broker/broker';
import { unitPrefix, unitTopic } from '../../shared/contracts/topics';
import { rawConnect, rawSocket, qos1 } from '../helpers/raw-mqtt';
import { waitFor } from '../helpers/fake-unit';

const secret = (serial: string) => `secret-${serial}`;
const statusWill = (serial: string) => ({
  topic: unitTopic(serial, 'status'),
  payload: Buffer.from('{"v":1,"online":false}'),
  qos: 1 as const,
  retain: true,
});

let brokers: RunningBroker[] = [];
afterEach(async () => {
  for (const b of brokers) await b.close();
  brokers = [];
});

async function broker(extra: Partial<BrokerOptions> = {}): Promise<{ b: RunningBroker; got: string[] }> {
  const got: string[] = [];
  const b = await startBroker({
    host: '127.0.0.1',
    port: 0,
    unitPrefix,
    authenticate: async (u, p) => (p === secret(u) ? { kind: 'unit', serial: u } : null),
    ...extra,
  });
  brokers.push(b);
  b.aedes.subscribe(
    'bw/v1/units/#',
    (pkt, cb) => {
      got.push(`${pkt.topic} ${pkt.payload.toString()}`);
      cb();
    },
    () => undefined,
  );
  return { b, got };
}

describe('client id is tied to the authenticated serial', () => {
  it('refuses a unit whose client id is another unit\'s serial with "identifier rejected", and the other unit stays connected with its will unpublished', async () => {
    const { b, got } = await broker();
    const victim = await rawConnect(b.port, 'U-0002', secret('U-0002'), { will: statusWill('U-0002') });
    expect(victim.connack.returnCode).toBe(0);
    const attacker = await rawConnect(b.port, 'U-0001', secret('U-0001'), { clientId: 'U-0002' });
    expect(attacker.connack.returnCode).toBe(2);
    await attacker.c.closed;
    // The victim still works: its publish is acknowledged on the same connection.
    victim.c.send(qos1(unitTopic('U-0002', 'telemetry'), '{}', 7));
    expect((await victim.c.next('puback')).messageId).toBe(7);
    expect(victim.c.isClosed()).toBe(false);
    expect(got.filter((g) => g.startsWith(unitTopic('U-0002', 'status')))).toEqual([]);
    expect(b.counters.refused.identifier_rejected).toBe(1);
    victim.c.destroy();
  });

  it('refuses an empty or different client id, and accepts the serial itself', async () => {
    const { b } = await broker();
    expect((await rawConnect(b.port, 'U-0003', secret('U-0003'), { clientId: '' })).connack.returnCode).toBe(2);
    expect((await rawConnect(b.port, 'U-0003', secret('U-0003'), { clientId: 'test-U-0003-x' })).connack.returnCode).toBe(2);
    const ok = await rawConnect(b.port, 'U-0003', secret('U-0003'));
    expect(ok.connack.returnCode).toBe(0);
    ok.c.destroy();
  });

  it('lets a unit take over its own session (a reconnect after a half-open link)', async () => {
    const { b } = await broker();
    const first = await rawConnect(b.port, 'U-0004', secret('U-0004'));
    const second = await rawConnect(b.port, 'U-0004', secret('U-0004'));
    expect(second.connack.returnCode).toBe(0);
    await first.c.closed;
    expect(second.c.isClosed()).toBe(false);
    second.c.destroy();
  });

  it('refuses a will outside the unit\'s own status topic with "not authorized"', async () => {
    const { b } = await broker();
    const foreign = await rawConnect(b.port, 'U-0005', secret('U-0005'), { will: statusWill('U-0006') });
    expect(foreign.connack.returnCode).toBe(5);
    const ownTelemetry = await rawConnect(b.port, 'U-0005', secret('U-0005'), {
      will: { ...statusWill('U-0005'), topic: unitTopic('U-0005', 'telemetry') },
    });
    expect(ownTelemetry.connack.returnCode).toBe(5);
    expect(b.counters.refused.will_denied).toBe(2);
  });
});

describe('disconnectUnit', () => {
  it('closes every connection of that unit, publishes its will, and leaves other units connected', async () => {
    const { b, got } = await broker();
    const a = await rawConnect(b.port, 'U-0010', secret('U-0010'), { will: statusWill('U-0010') });
    const other = await rawConnect(b.port, 'U-0011', secret('U-0011'));
    expect(b.disconnectUnit('U-0010')).toBe(true);
    await a.c.closed;
    await waitFor(() => got.some((g) => g.startsWith(unitTopic('U-0010', 'status'))), 2000, 'the will');
    expect(other.c.isClosed()).toBe(false);
    expect(b.disconnectUnit('U-0010')).toBe(false);
    expect(b.disconnectUnit('U-9999')).toBe(false);
    other.c.destroy();
  });

  it('refuses a CONNECT whose credential check was still running when the unit was disconnected', async () => {
    let release: () => void = () => undefined;
    const gate = new Promise<void>((r) => {
      release = r;
    });
    const { b } = await broker({
      authenticate: async (u, p) => {
        if (u === 'U-0012') await gate;
        return p === secret(u) ? { kind: 'unit', serial: u } : null;
      },
    });
    const pending = rawConnect(b.port, 'U-0012', secret('U-0012'));
    await waitFor(() => b.counters.pending === 1, 2000, 'the CONNECT to be under authentication');
    b.disconnectUnit('U-0012');
    release();
    expect((await pending).connack.returnCode).toBe(3); // server unavailable: the unit retries and is checked afresh
  });
});

describe('memory before authentication', () => {
  it('drops a connection whose first packet announces more than the CONNECT limit, without buffering it', async () => {
    const { b } = await broker();
    const c = await rawSocket(b.port);
    // CONNECT announcing 200 MB (remaining length 0xC8 0x80 0x80 0x60 is 200 × 2^20), then a first few bytes of it.
    c.send(Buffer.concat([Buffer.from([0x10, 0x80, 0x80, 0x80, 0x64]), Buffer.alloc(1000, 0x41)]));
    await c.closed;
    expect(b.counters.tooLarge).toBe(1);
  });

  it('drops an authenticated unit sending a packet above the packet limit, and counts it for the unit', async () => {
    const denied: string[] = [];
    const { b } = await broker({ onDenied: (p, _topic, reason) => denied.push(`${p?.kind === 'unit' ? p.serial : '?'} ${reason}`) });
    const { c, connack } = await rawConnect(b.port, 'U-0020', secret('U-0020'));
    expect(connack.returnCode).toBe(0);
    c.send(qos1(unitTopic('U-0020', 'telemetry'), Buffer.alloc(1024 * 1024, 0x20), 1));
    await c.closed;
    expect(c.received.filter((p) => p.cmd === 'puback')).toEqual([]);
    expect(b.counters.tooLarge).toBe(1);
    expect(denied).toEqual(['U-0020 too_large']);
  });

  it('closes a connection that sends no CONNECT within the connect timeout', async () => {
    const { b } = await broker({ limits: { connectTimeoutMs: 200 } });
    const c = await rawSocket(b.port);
    await c.closed;
    expect(b.counters.connectTimeouts).toBe(1);
  });

  it('bounds the connections not yet authenticated: one over the limit is closed at once', async () => {
    const { b } = await broker({ limits: { maxPendingConnections: 3 } });
    const idle = await Promise.all([1, 2, 3].map(() => rawSocket(b.port)));
    await waitFor(() => b.counters.pending === 3, 2000, 'three pending connections');
    const over = await rawSocket(b.port);
    await over.closed;
    expect(b.counters.pendingLimit).toBe(1);
    expect(idle.map((c) => c.isClosed())).toEqual([false, false, false]);
    for (const c of idle) c.destroy();
    await waitFor(() => b.counters.pending === 0, 2000, 'no pending connection');
    // A unit that authenticates no longer counts against the limit.
    const units = await Promise.all(['U-0031', 'U-0032', 'U-0033', 'U-0034'].map((s) => rawConnect(b.port, s, secret(s))));
    expect(units.map((u) => u.connack.returnCode)).toEqual([0, 0, 0, 0]);
    for (const u of units) u.c.destroy();
  });
});

describe('messages the ingest took', () => {
  it('with forwardTaken: false they are acknowledged but routed to no subscriber; a retained status and a will still are', async () => {
    const taken: string[] = [];
    const { b, got } = await broker({
      forwardTaken: false,
      onMessage: (unit, leaf, payload, done) => {
        taken.push(`${unit.serial} ${leaf} ${payload.toString()}`);
        done();
      },
    });
    const u = await rawConnect(b.port, 'U-0040', secret('U-0040'), { will: statusWill('U-0040') });
    u.c.send(qos1(unitTopic('U-0040', 'telemetry'), '{"n":1}', 11));
    expect((await u.c.next('puback')).messageId).toBe(11);
    u.c.send({ ...qos1(unitTopic('U-0040', 'status'), '{"v":1,"online":true}', 12), retain: true });
    expect((await u.c.next('puback')).messageId).toBe(12);
    expect(taken).toEqual(['U-0040 telemetry {"n":1}', 'U-0040 status {"v":1,"online":true}']);
    await waitFor(() => got.length === 1, 2000, 'the retained status');
    expect(got).toEqual([`${unitTopic('U-0040', 'status')} {"v":1,"online":true}`]);
    u.c.destroy();
    await waitFor(() => got.length === 2, 2000, 'the will');
    expect(got[1]).toBe(`${unitTopic('U-0040', 'status')} {"v":1,"online":false}`);
  });

  it('by default they go on to subscribers as well', async () => {
    const { b, got } = await broker({ onMessage: (_u, _l, _p, done) => done() });
    const u = await rawConnect(b.port, 'U-0041', secret('U-0041'));
    u.c.send(qos1(unitTopic('U-0041', 'telemetry'), '{"n":2}', 3));
    expect((await u.c.next('puback')).messageId).toBe(3);
    await waitFor(() => got.length === 1, 2000, 'the telemetry');
    expect(got).toEqual([`${unitTopic('U-0041', 'telemetry')} {"n":2}`]);
    u.c.destroy();
  });
});
