import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { TelemetryPartitions } from '../../server/data/telemetry-partitions';
import { MONTHS_AHEAD, RetentionJob } from '../../server/services/retention-job';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

let testDb: TestDatabase;
let partitions: TelemetryPartitions;
let unitId: number;
beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
  partitions = new TelemetryPartitions(testDb.db);
  unitId = Number((await testDb.db('units').where({ serial: 'QED-2405' }).first('id')).id);
});
afterAll(async () => {
  await testDb?.drop();
});

const DAY = 86_400_000;
const monthStart = (ms: number, add = 0) => {
  const d = new Date(ms);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + add, 1);
};
const nameOf = (ms: number) => `p${new Date(ms).toISOString().slice(0, 7).replace('-', '')}`;
const row = (ts: Date) => ({
  unit_id: unitId,
  ts,
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
});
const countIn = async (partition: string) => {
  const [rows] = (await testDb.db.raw(`SELECT COUNT(*) AS n FROM telemetry PARTITION (${partition})`)) as unknown as [{ n: number }[]];
  return Number(rows[0]!.n);
};
const names = async () => (await partitions.list()).map((p) => p.name);

describe('raw telemetry partitioned by month', () => {
  it('is made with p_before, a partition per month from 13 months back to 3 ahead, and p_future', async () => {
    const now = Date.now();
    const expected = ['p_before'];
    for (let m = monthStart(now, -13); m <= monthStart(now, MONTHS_AHEAD); m = monthStart(m, 1)) expected.push(nameOf(m));
    expected.push('p_future');
    expect(await names()).toEqual(expected);
    const parts = await partitions.list();
    const thisMonth = parts.find((p) => p.name === nameOf(now))!;
    expect([thisMonth.fromMs, thisMonth.toMs]).toEqual([monthStart(now), monthStart(now, 1)]);
  });

  it('stores each row in the partition of its month, and rows of any time (1990, 2099) in p_before and p_future', async () => {
    const now = Date.now();
    const first = new Date(monthStart(now));
    const last = new Date(monthStart(now, 1) - 1);
    await testDb.db('telemetry').insert([row(first), row(last), row(new Date(monthStart(now) - 1))]);
    expect(await countIn(nameOf(now))).toBe(2);
    expect(await countIn(nameOf(monthStart(now, -1)))).toBe(1);
    await testDb.db('telemetry').insert([row(new Date('1990-06-01T12:00:00Z')), row(new Date('2099-06-01T12:00:00Z'))]);
    expect(await countIn('p_before')).toBe(1);
    expect(await countIn('p_future')).toBe(1);
  });

  it('adds the coming months by splitting p_future, moving a row already there into its new month', async () => {
    const now = Date.now();
    const beyond = monthStart(now, MONTHS_AHEAD + 1);
    await testDb.db('telemetry').insert([row(new Date(beyond + 3 * DAY))]);
    expect(await countIn('p_future')).toBe(2);
    const added = await partitions.ensureAhead(monthStart(now, MONTHS_AHEAD + 2) + 5 * DAY);
    expect(added).toEqual([nameOf(beyond), nameOf(monthStart(now, MONTHS_AHEAD + 2))]);
    expect(await countIn(nameOf(beyond))).toBe(1);
    expect(await countIn('p_future')).toBe(1);
    expect((await names()).at(-1)).toBe('p_future');
    // Asking again for months that exist changes nothing.
    expect(await partitions.ensureAhead(monthStart(now, MONTHS_AHEAD + 2))).toEqual([]);
  });

  it('retention drops whole months past the cutoff, keeps a month only partly past it, and trims p_before', async () => {
    const now = Date.now();
    const old = monthStart(now, -12);
    const partly = monthStart(now, -11);
    await testDb.db('telemetry').insert([row(new Date(old + DAY)), row(new Date(old + 20 * DAY)), row(new Date(partly + DAY))]);
    const cutoff = new Date(partly + 10 * DAY);
    const { dropped, strayRows } = await partitions.dropBefore(cutoff);
    // Every month from 13 back to 12 back is wholly before the cutoff; the 1990 row was in p_before.
    expect(dropped).toEqual([nameOf(monthStart(now, -13)), nameOf(old)]);
    expect(strayRows).toBe(1);
    expect(await names()).not.toContain(nameOf(old));
    expect(await countIn(nameOf(partly))).toBe(1);
    expect(await testDb.db('telemetry').where('ts', '<', new Date(partly)).count({ n: '*' })).toEqual([{ n: 0 }]);
    // A late row of a dropped month still stores (in the next partition), as does one older than every partition.
    await testDb.db('telemetry').insert([row(new Date(old + 2 * DAY)), row(new Date('1980-01-01T00:00:00Z'))]);
    expect(await countIn(nameOf(partly))).toBe(2);
    expect(await countIn('p_before')).toBe(1);
  });

  it('the retention job makes the months ahead first, then drops what is past the retention', async () => {
    const now = monthStart(Date.now(), MONTHS_AHEAD + 4) + 2 * DAY;
    const job = new RetentionJob(partitions, 400, pino({ level: 'silent' }), () => now);
    const lastBefore = (await partitions.list()).at(-2)!;
    const expected: string[] = [];
    for (let m = lastBefore.toMs!; m <= monthStart(now, MONTHS_AHEAD); m = monthStart(m, 1)) expected.push(nameOf(m));
    const result = await job.runOnce();
    expect(result.added).toEqual(expected);
    expect((await names()).includes(nameOf(monthStart(now, MONTHS_AHEAD)))).toBe(true);
    expect(result.dropped.length).toBeGreaterThan(0);
    const cutoff = now - 400 * DAY;
    for (const p of await partitions.list()) if (/^p\d{6}$/.test(p.name)) expect(p.toMs!).toBeGreaterThan(cutoff);
  });
});
