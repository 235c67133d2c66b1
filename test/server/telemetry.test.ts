import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestStack } from '../helpers/test-stack';
import { connectUnit, publish, sample, waitFor } from '../helpers/fake-unit';
import { unitTopic } from '../../shared/contracts/topics';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { ingest: { flushMs: 20 }, rollupIntervalMs: 60_000 } });
});
afterAll(async () => {
  await stack?.stop();
});

const count = async (table: string, where: Record<string, unknown> = {}) =>
  Number(((await stack.db(table).where(where).count({ n: '*' })) as [{ n: number }])[0].n);
const unitId = (serial: string) => stack.units.get(serial)!.id;

describe('device credentials and topic ACL', () => {
  it('accepts a unit with its own secret and refuses a wrong secret with "bad username or password"', async () => {
    const ok = await connectUnit(stack.broker.port, 'QHL-2401');
    expect(ok.connected).toBe(true);
    await ok.endAsync();
    await expect(connectUnit(stack.broker.port, 'QHL-2401', 'not-the-secret')).rejects.toMatchObject({ code: 4 });
    await expect(connectUnit(stack.broker.port, 'NOPE-0001', 'whatever')).rejects.toMatchObject({ code: 4 });
  });

  it('refuses a disabled unit', async () => {
    await stack.db('units').where({ serial: 'QED-2406' }).update({ disabled: true });
    try {
      await expect(connectUnit(stack.broker.port, 'QED-2406')).rejects.toMatchObject({ code: 4 });
    } finally {
      await stack.db('units').where({ serial: 'QED-2406' }).update({ disabled: false });
    }
  });

  it('does not let unit A publish as unit B: the publish is dropped, counted, and A is disconnected', async () => {
    const before = stack.ingest.counters.rejected.acl_denied;
    const a = await connectUnit(stack.broker.port, 'QHL-2402');
    const closed = new Promise<void>((r) => a.once('close', () => r()));
    a.publish(unitTopic('QHL-2403', 'telemetry'), JSON.stringify(sample(1, Date.now())), { qos: 1 });
    await closed;
    expect(stack.ingest.counters.rejected.acl_denied).toBe(before + 1);
    expect(await count('telemetry', { unit_id: unitId('QHL-2403') })).toBe(0);
    a.end(true);
  });

  it("does not let unit A read unit B's commands (SUBACK failure), but its own", async () => {
    const a = await connectUnit(stack.broker.port, 'QHL-2404');
    // mqtt.js turns a SUBACK return code 0x80 into a rejected promise.
    await expect(a.subscribeAsync(unitTopic('QHL-2405', 'commands'), { qos: 1 })).rejects.toThrow(/Subscribe error/);
    await expect(a.subscribeAsync('bw/v1/units/+/commands', { qos: 1 })).rejects.toThrow(/Subscribe error/);
    expect(a.connected).toBe(true);
    const own = await a.subscribeAsync(unitTopic('QHL-2404', 'commands'), { qos: 1 });
    expect(own[0]!.qos).toBe(1);
    await a.endAsync();
  });
});

describe('validation of unit messages', () => {
  it('rejects each bad payload with its reason, stores none of them, and keeps serving good traffic', async () => {
    const serial = 'QED-2401';
    const u = await connectUnit(stack.broker.port, serial);
    const r0 = { ...stack.ingest.counters.rejected };
    const now = Date.now();
    await publish(u, serial, 'telemetry', Buffer.alloc(9000, 32));
    await publish(u, serial, 'telemetry', '{"v":1,');
    await publish(u, serial, 'telemetry', { ...sample(1, now), poaWm2: 'bright' });
    await publish(u, serial, 'telemetry', { ...sample(2, now), extra: 1 });
    await publish(u, serial, 'telemetry', sample(3, now + 10 * 60_000));
    await publish(u, serial, 'telemetry', sample(4, now - 401 * 86_400_000));
    await publish(u, serial, 'telemetry', { ...sample(5, now), tiltDeg: Number.NaN }); // JSON turns NaN into null
    await publish(u, serial, 'telemetry', sample(6, now));
    await waitFor(async () => (await count('telemetry', { unit_id: unitId(serial) })) === 1, 5000, 'the good sample');
    const r = stack.ingest.counters.rejected;
    expect(r.oversized - r0.oversized).toBe(1);
    expect(r.malformed_json - r0.malformed_json).toBe(1);
    expect(r.invalid_payload - r0.invalid_payload).toBe(3);
    expect(r.future_timestamp - r0.future_timestamp).toBe(1);
    expect(r.too_old - r0.too_old).toBe(1);
    const rows = await stack.db('telemetry').where({ unit_id: unitId(serial) });
    expect(rows.map((x) => Number(x.seq))).toEqual([6]);
    await u.endAsync();
  });
});

describe('storage', () => {
  it('stores a resent buffer once: exact row counts, duplicates counted', async () => {
    const serial = 'QED-2402';
    const u = await connectUnit(stack.broker.port, serial);
    const t0 = Date.now() - 3600_000;
    const dup0 = stack.ingest.counters.duplicates;
    for (let i = 0; i < 50; i++) await publish(u, serial, 'telemetry', sample(i, t0 + i * 5000));
    await waitFor(async () => (await count('telemetry', { unit_id: unitId(serial) })) === 50, 5000, '50 rows');
    for (let i = 0; i < 50; i++) await publish(u, serial, 'telemetry', sample(i, t0 + i * 5000));
    await waitFor(() => stack.ingest.counters.duplicates - dup0 === 50, 5000, '50 duplicates');
    expect(await count('telemetry', { unit_id: unitId(serial) })).toBe(50);
    await u.endAsync();
  });

  it('accepts late and out-of-order samples', async () => {
    const serial = 'QED-2403';
    const u = await connectUnit(stack.broker.port, serial);
    const t0 = Date.now() - 7200_000;
    const order = [5, 1, 9, 0, 3, 7, 2, 8, 4, 6];
    for (const i of order) await publish(u, serial, 'telemetry', sample(i, t0 + i * 5000));
    await waitFor(async () => (await count('telemetry', { unit_id: unitId(serial) })) === 10, 5000, '10 rows');
    const rows = await stack
      .db('telemetry')
      .where({ unit_id: unitId(serial) })
      .orderBy('ts');
    expect(rows.map((r) => Number(r.seq))).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    expect(rows[0].ts.getTime()).toBe(t0);
    await u.endAsync();
  });

  it('keeps rollups equal to aggregates of the raw rows, after late data too', async () => {
    const serial = 'QED-2404';
    const id = unitId(serial);
    const u = await connectUnit(stack.broker.port, serial);
    const t0 = Math.floor((Date.now() - 86_400_000) / 900_000) * 900_000; // a quarter-hour start yesterday
    for (let i = 0; i < 240; i += 2) await publish(u, serial, 'telemetry', sample(i, t0 + i * 5000)); // 20 min, gaps
    await waitFor(async () => (await count('telemetry', { unit_id: id })) === 120, 5000, '120 rows');
    await stack.ingest.drain(); // the rows are marked for rollup right after their commit
    await stack.rollups.runOnce();
    for (let i = 1; i < 240; i += 2) await publish(u, serial, 'telemetry', sample(i, t0 + i * 5000)); // the late half
    await waitFor(async () => (await count('telemetry', { unit_id: id })) === 240, 5000, '240 rows');
    await stack.ingest.drain();
    await stack.rollups.runOnce();

    const raw = await stack.db('telemetry').where({ unit_id: id }).orderBy('ts');
    const byMinute = new Map<number, number[]>();
    for (const r of raw) {
      const m = Math.floor(r.ts.getTime() / 60_000) * 60_000;
      byMinute.set(m, [...(byMinute.get(m) ?? []), r.dc_power_w]);
    }
    const minutes = await stack.db('telemetry_1m').where({ unit_id: id }).orderBy('bucket');
    expect(minutes).toHaveLength(20);
    for (const m of minutes) {
      const p = byMinute.get(m.bucket.getTime())!;
      expect(m.samples).toBe(12);
      expect(m.dc_power_avg_w).toBeCloseTo(p.reduce((a, b) => a + b, 0) / p.length, 6);
      expect(m.energy_wh).toBeCloseTo(p.reduce((a, b) => a + b, 0) / p.length / 60, 6);
    }
    const quarters = await stack.db('telemetry_15m').where({ unit_id: id }).orderBy('bucket');
    expect(quarters.map((q) => q.minutes)).toEqual([15, 5]);
    expect(quarters[0].energy_wh).toBeCloseTo(
      minutes.slice(0, 15).reduce((s, m) => s + m.energy_wh, 0),
      6,
    );
    const daily = await stack.db('energy_daily').where({ unit_id: id });
    expect(daily.reduce((s, d) => s + d.energy_wh, 0)).toBeCloseTo(
      minutes.reduce((s, m) => s + m.energy_wh, 0),
      6,
    );
    expect(daily.reduce((s, d) => s + d.minutes, 0)).toBe(20);
    await u.endAsync();
  });

  it('drops raw samples in months wholly past the retention and keeps newer ones', async () => {
    const id = unitId('QED-2405');
    const base = {
      seq: 1,
      tilt_plus_wm2: 1,
      tilt_minus_wm2: 1,
      azimuth_plus_wm2: 1,
      azimuth_minus_wm2: 1,
      poa_wm2: 1,
      tilt_deg: 1,
      azimuth_deg: 1,
      cmd_tilt_deg: 1,
      cmd_azimuth_deg: 1,
      tilt_motor_a: 0,
      azimuth_motor_a: 0,
      dc_power_w: 1,
      module_temp_c: 1,
      mode: 'settled',
      received_at: new Date(),
    };
    const now = Date.now();
    // 432 days back lies in a month wholly past the 400 days; 399 days back is inside them.
    await stack.db('telemetry').insert([
      { ...base, unit_id: id, ts: new Date(now - 432 * 86_400_000) },
      { ...base, unit_id: id, ts: new Date(now - 399 * 86_400_000) },
    ]);
    await stack.retention.runOnce();
    const left = await stack.db('telemetry').where({ unit_id: id });
    expect(left.map((r) => Math.round((now - r.ts.getTime()) / 86_400_000))).toEqual([399]);
  });

  it('stores weather against the site of the unit that carries the station, and unit events once', async () => {
    const serial = 'FSC-2401'; // the station of Fenwick Lane School Courtyard
    const u = await connectUnit(stack.broker.port, serial);
    const ts = new Date(Date.now() - 60_000).toISOString();
    const siteId = stack.units.get(serial)!.siteId;
    await publish(u, serial, 'weather', { v: 1, ts, ghiWm2: 420, dhiWm2: 130, airTempC: 12.5, windMs: 4.2, gustMs: 9.1 });
    await publish(u, serial, 'weather', { v: 1, ts, ghiWm2: 420, airTempC: 12.5, windMs: 4.2, gustMs: 9.1 }); // resend
    const event = { v: 1, ts, kind: 'mode-change', mode: 'stowed', code: 'wind-stow', message: 'gust 19.2 m/s' };
    await publish(u, serial, 'events', event);
    await publish(u, serial, 'events', event);
    await waitFor(
      async () => (await count('weather', { site_id: siteId })) === 1 && (await count('unit_events', { unit_id: unitId(serial) })) === 1,
      5000,
      'weather and event rows',
    );
    await new Promise((r) => setTimeout(r, 200));
    const w = await stack.db('weather').where({ site_id: siteId }).first();
    expect(w).toMatchObject({ ghi_wm2: 420, dhi_wm2: 130, wind_ms: 4.2 });
    expect(await count('unit_events', { unit_id: unitId(serial) })).toBe(1);
    await u.endAsync();
  });
});
