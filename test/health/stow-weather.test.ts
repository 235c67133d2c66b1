import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestStack } from '../helpers/test-stack';
import { sample } from '../helpers/fake-unit';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const t0 = Date.parse('2026-06-21T10:00:00Z');
let clock = t0;
// One clock for the ingest and the health engine; the periodic health tick is pushed out of reach: nothing here may
// depend on it.
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { ingest: { now: () => clock }, health: { now: () => clock, tickMs: 3_600_000 } } });
});
afterAll(async () => {
  await stack?.stop();
});

const receive = (serial: string, leaf: string, body: unknown) =>
  new Promise<void>((res, rej) => stack.ingest.receive(serial, leaf, Buffer.from(JSON.stringify(body)), (err) => (err ? rej(err) : res())));

describe('wind stow from the ingest', () => {
  it("a gust reported by the site's weather station raises the not-stowed alarm on the unit's next reports, without a health tick", async () => {
    const station = stack.units.all().find((u) => u.weatherStation && !u.onHold && !u.disabled)!;
    expect(station).toBeDefined();
    // Default limits (health-settings.ts): gusts above 18 m/s demand a stow, reached within 3 min (tilt ≤ 2° or mode stowed).
    await receive(station.serial, 'weather', { v: 1, ts: new Date(t0).toISOString(), ghiWm2: 400, airTempC: 12, windMs: 14, gustMs: 26 });
    clock = t0 + 1000;
    await receive(station.serial, 'telemetry', sample(1, clock, { tiltDeg: 40, mode: 'settled' }));
    clock = t0 + 4 * 60_000;
    await receive(station.serial, 'telemetry', sample(2, clock, { tiltDeg: 40, mode: 'settled' }));
    await stack.health.flush();
    expect(stack.ingest.counters.stored).toBe(2);

    const alarms = await stack.db('alarms').where({ unit_id: station.id, kind: 'not-stowed', state: 'active' });
    expect(alarms).toHaveLength(1);
    expect(alarms[0]).toMatchObject({ severity: 'P1', site_id: station.siteId });
    expect(alarms[0].message).toMatch(/^Not stowed 4 min after gusts of 26 m\/s \(limit 18 m\/s\): tilt 40°, settled\.$/);
  });
});
