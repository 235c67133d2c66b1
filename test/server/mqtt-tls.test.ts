import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import mqtt from 'mqtt';
import { unitTopic } from '../../shared/contracts/topics';
import { testDeviceSecret } from '../helpers/device-secrets';
import { ensureDevCertificate } from '../../broker/dev-certificate';
import { startTestStack } from '../helpers/test-stack';
import { rawSocket } from '../helpers/raw-mqtt';
import { sample, waitFor } from '../helpers/fake-unit';

let stack: Awaited<ReturnType<typeof startTestStack>>;
let dir: string;
let cert: { certPath: string; keyPath: string };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'bw-tls-'));
  cert = ensureDevCertificate(dir);
  stack = await startTestStack({ seed: true, brokerTls: { port: 0, ...cert }, stack: { ingest: { flushMs: 20 } } });
});
afterAll(async () => {
  await stack?.stop();
  rmSync(dir, { recursive: true, force: true });
});

const tlsPort = () => stack.broker.tlsPort!;

describe('MQTT over TLS', () => {
  it('stores a reading from a unit that verified the broker against the development certificate', async () => {
    const serial = 'FSC-2402';
    const u = await mqtt.connectAsync(`mqtts://127.0.0.1:${tlsPort()}`, {
      username: serial,
      password: testDeviceSecret(serial),
      clientId: serial,
      reconnectPeriod: 0,
      ca: readFileSync(cert.certPath),
      rejectUnauthorized: true,
    });
    const ts = Date.now() - 30_000;
    await u.publishAsync(unitTopic(serial, 'telemetry'), JSON.stringify(sample(1, ts)), { qos: 1 });
    const rows = await stack.db('telemetry').where({ unit_id: stack.units.get(serial)!.id, ts: new Date(ts) });
    expect(rows).toHaveLength(1);
    await u.endAsync();
  });

  it('applies the same credentials and client-id rule as plain MQTT', async () => {
    const opts = { reconnectPeriod: 0, ca: readFileSync(cert.certPath), rejectUnauthorized: true };
    await expect(
      mqtt.connectAsync(`mqtts://127.0.0.1:${tlsPort()}`, { ...opts, username: 'FSC-2403', password: 'wrong', clientId: 'FSC-2403' }),
    ).rejects.toMatchObject({ code: 4 });
    await expect(
      mqtt.connectAsync(`mqtts://127.0.0.1:${tlsPort()}`, {
        ...opts,
        username: 'FSC-2403',
        password: testDeviceSecret('FSC-2403'),
        clientId: 'FSC-2404',
      }),
    ).rejects.toMatchObject({ code: 2 });
  });

  it('does not complete a handshake for a client that does not trust the certificate, and keeps serving', async () => {
    await expect(rawSocket(tlsPort(), { rejectUnauthorized: true })).rejects.toThrow(/self[- ]signed|unable to verify|certificate/i);
    await waitFor(() => stack.broker.counters.tlsErrors >= 1, 3000, 'the failed handshake to be counted');
    const c = await rawSocket(tlsPort(), { ca: readFileSync(cert.certPath), rejectUnauthorized: true });
    expect(c.isClosed()).toBe(false);
    c.destroy();
  });
});
