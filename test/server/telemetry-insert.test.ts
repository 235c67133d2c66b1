import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { eventKey, telemetryKey, TelemetryRepository, type TelemetryRow } from '../../server/data/telemetry-repository';

let t: TestDatabase;
let repo: TelemetryRepository;
let unitId: number;

beforeAll(async () => {
  t = await createTestDatabase({ seed: true });
  unitId = (await t.db('units').first('id')).id;
  repo = new TelemetryRepository(t.db);
});
afterAll(() => t.drop());

const T = Date.parse('2026-12-03T10:00:00.123Z');
const row = (tsMs: number, over: Partial<TelemetryRow> = {}): TelemetryRow => ({
  unit_id: unitId,
  ts: new Date(tsMs),
  seq: 7,
  tilt_plus_wm2: 500.5,
  tilt_minus_wm2: 490,
  azimuth_plus_wm2: 495,
  azimuth_minus_wm2: 497,
  poa_wm2: 612,
  tilt_deg: 33,
  azimuth_deg: 181,
  cmd_tilt_deg: 33,
  cmd_azimuth_deg: 181,
  tilt_motor_a: 0.1,
  azimuth_motor_a: 0,
  dc_power_w: 250,
  module_temp_c: 30,
  mode: "settled'; --",
  received_at: new Date(tsMs + 40),
  ...over,
});

describe('telemetry inserts say what they added', () => {
  it('a batch of new rows: all added (no key list), stored as given, times in UTC to the millisecond', async () => {
    const rows = [row(T), row(T + 1000), row(T + 2000)];
    expect(await repo.insertTelemetry(rows)).toEqual({ count: 3, keys: null });
    const stored = await t.db('telemetry').where({ unit_id: unitId }).orderBy('ts');
    expect(stored.map((r) => r.ts.toISOString())).toEqual([
      '2026-12-03T10:00:00.123Z',
      '2026-12-03T10:00:01.123Z',
      '2026-12-03T10:00:02.123Z',
    ]);
    expect(stored[0]).toMatchObject({ seq: 7, tilt_plus_wm2: 500.5, mode: "settled'; --" });
    expect(stored[0].received_at.toISOString()).toBe('2026-12-03T10:00:00.163Z');
  });

  it('a batch with resends: only the new rows, by key, and a reading with its resend in one batch counts once', async () => {
    const rows = [row(T + 1000), row(T + 3000), row(T + 3000, { seq: 8 }), row(T + 4000)];
    const added = await repo.insertTelemetry(rows);
    expect(added.count).toBe(2);
    expect([...(added.keys ?? [])].sort()).toEqual(
      [telemetryKey(unitId, new Date(T + 3000)), telemetryKey(unitId, new Date(T + 4000))].sort(),
    );
    // INSERT IGNORE keeps the first copy of a key
    expect(
      (
        await t
          .db('telemetry')
          .where({ unit_id: unitId, ts: new Date(T + 3000) })
          .first()
      ).seq,
    ).toBe(7);
  });

  it('nothing new: count 0 and an empty key list (not "all")', async () => {
    expect(await repo.insertTelemetry([row(T)])).toEqual({ count: 0, keys: new Set() });
    expect(await repo.insertTelemetry([])).toEqual({ count: 0, keys: null });
  });

  it('events the same way (key: unit, ts, kind), their JSON body stored as sent (quotes and question marks included)', async () => {
    const body = JSON.stringify({ v: 1, ts: new Date(T).toISOString(), kind: 'fault', message: 'a "quoted" ? mark' });
    const ev = { unit_id: unitId, ts: new Date(T), kind: 'fault', body };
    expect(await repo.insertEvents([ev])).toEqual({ count: 1, keys: null });
    expect(await repo.insertEvents([ev, { ...ev, kind: 'boot' }])).toEqual({
      count: 1,
      keys: new Set([eventKey(unitId, new Date(T), 'boot')]),
    });
    expect((await t.db('unit_events').where({ unit_id: unitId, kind: 'fault' }).first()).body).toEqual(JSON.parse(body));
  });
});
