import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pino } from 'pino';
import request from 'supertest';
import WebSocket from 'ws';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { waitFor } from '../helpers/fake-unit';
import { startStack, type Stack } from '../../server/stack';
import { TelemetryRepository, type TelemetryRow } from '../../server/data/telemetry-repository';

let t: TestDatabase;
let stack: Stack | undefined;
const HOUR = 3_600_000;

function row(unitId: number, tsMs: number, over: Partial<TelemetryRow> = {}): TelemetryRow {
  return {
    unit_id: unitId,
    ts: new Date(tsMs),
    seq: 1,
    tilt_plus_wm2: 500,
    tilt_minus_wm2: 490,
    azimuth_plus_wm2: 495,
    azimuth_minus_wm2: 497,
    poa_wm2: 612,
    tilt_deg: 33,
    azimuth_deg: 181,
    cmd_tilt_deg: 33,
    cmd_azimuth_deg: 181,
    tilt_motor_a: 0,
    azimuth_motor_a: 0,
    dc_power_w: 240,
    module_temp_c: 28,
    mode: 'settled',
    received_at: new Date(tsMs + 400),
    ...over,
  };
}

beforeAll(async () => {
  t = await createTestDatabase({ seed: true });
});
afterAll(async () => {
  await stack?.stop();
  await t?.drop();
});

describe('a restart keeps the fleet', () => {
  it('rebuilds the live picture from the last stored reports and raises the comms alarm of a site that went dark before the restart', async () => {
    const units = await t.db('units as u').join('sites as s', 's.id', 'u.site_id').select('u.id', 'u.serial', 's.name', 'u.site_id');
    const dark = units.filter((u) => u.name === 'Eastfield Depot Yard');
    const now = Date.now();
    const repo = new TelemetryRepository(t.db);
    // Every unit of one site last reported an hour ago; an older report of the first unit must not win.
    await repo.insertTelemetry([
      ...dark.map((u) => row(u.id, now - HOUR, { poa_wm2: 600 + u.id })),
      row(dark[0]!.id, now - 2 * HOUR, { poa_wm2: 1 }),
    ]);

    stack = await startStack(
      { ...t.config, port: 0, broker: { ...t.config.broker, port: 0 }, sessionSecret: 'test-secret-test-secret-test-secret-0' },
      pino({ level: 'silent' }),
      { health: { tickMs: 50, restoreGraceMs: 300 } },
    );
    const first = stack.live.get(dark[0]!.id)!;
    expect(first).toMatchObject({
      online: false,
      lastReportAt: new Date(now - HOUR).toISOString(),
      poaWm2: 600 + dark[0]!.id,
      mode: 'settled',
      tiltDeg: 33,
    });
    // A unit that never reported keeps "no reports yet".
    const other = units.find((u) => u.name === 'Harbourside Library Roof')!;
    expect(stack.live.get(other.id)).toBeUndefined();

    const alarm = await waitFor(
      () => t.db('alarms').where({ kind: 'site-comms', site_id: dark[0]!.site_id }).whereNull('cleared_at').first(),
      5000,
      'site comms alarm',
    );
    expect(alarm.unit_id).toBeNull();
    expect((typeof alarm.evidence === 'string' ? JSON.parse(alarm.evidence) : alarm.evidence).silentUnits).toHaveLength(dark.length);
    // Units that never reported are not part of any comms alarm.
    expect(await t.db('alarms').where({ site_id: other.site_id }).first()).toBeUndefined();
  });

  it('a graceful stop ends open dashboard sockets with "going away" instead of waiting for them', async () => {
    const res = await request(stack!.http)
      .post('/api/auth/sign-in')
      .send({ email: 'tech1@saltmarsh.example', password: DEMO_PASSWORD })
      .expect(200);
    const ws = new WebSocket(`${stack!.url.replace('http', 'ws')}/ws`, {
      headers: { Cookie: String(res.headers['set-cookie']).split(';')[0]! },
    });
    await new Promise((r) => ws.once('open', r));
    const closed = new Promise<number>((r) => ws.once('close', (code) => r(code)));
    await stack!.stop();
    stack = undefined;
    expect(await closed).toBe(1001);
  });
});
