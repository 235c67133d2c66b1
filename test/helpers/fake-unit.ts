import mqtt, { type MqttClient } from 'mqtt';
import { unitTopic } from '../../shared/contracts/topics';
import type { Telemetry } from '../../shared/contracts/wire';
import { testDeviceSecret } from './device-secrets';

/** A hand-driven unit for tests: connects with its serial and secret, publishes what the test says. */
export async function connectUnit(
  port: number,
  serial: string,
  password = testDeviceSecret(serial),
  extra: mqtt.IClientOptions = {},
): Promise<MqttClient> {
  return mqtt.connectAsync(`mqtt://127.0.0.1:${port}`, {
    username: serial,
    password,
    clientId: serial,
    reconnectPeriod: 0, // the broker requires client id = serial
    will: { topic: unitTopic(serial, 'status'), payload: Buffer.from(JSON.stringify({ v: 1, online: false })), qos: 1, retain: true },
    ...extra,
  });
}

export function sample(seq: number, tsMs: number, over: Partial<Telemetry> = {}): Telemetry {
  return {
    v: 1,
    seq,
    ts: new Date(tsMs).toISOString(),
    tiltPlusWm2: 610 + (seq % 7),
    tiltMinusWm2: 600,
    azimuthPlusWm2: 605,
    azimuthMinusWm2: 603,
    poaWm2: 640 + (seq % 11),
    tiltDeg: 35 + (seq % 3),
    azimuthDeg: 170 + (seq % 5),
    cmdTiltDeg: 35,
    cmdAzimuthDeg: 170,
    tiltMotorA: 0.1,
    azimuthMotorA: 0.05,
    dcPowerW: 250 + (seq % 13) * 3,
    moduleTempC: 31,
    mode: 'settled',
    firmware: '2.4.1',
    ...over,
  };
}

export async function publish(
  client: MqttClient,
  serial: string,
  leaf: Parameters<typeof unitTopic>[1],
  body: unknown,
  retain = false,
): Promise<void> {
  await client.publishAsync(unitTopic(serial, leaf), typeof body === 'string' || Buffer.isBuffer(body) ? body : JSON.stringify(body), {
    qos: 1,
    retain,
  });
}

/** Polls until `check` returns a truthy value or the time runs out. */
export async function waitFor<T>(check: () => T | Promise<T>, timeoutMs = 5000, what = 'condition'): Promise<NonNullable<T>> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v) return v as NonNullable<T>;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}
