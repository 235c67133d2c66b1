import { createHash } from 'node:crypto';
import pino from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AlarmRepository } from '../../server/data/alarm-repository';
import { HistoryRepository } from '../../server/data/history-repository';
import { HoldRepository } from '../../server/data/hold-repository';
import { TelemetryRepository } from '../../server/data/telemetry-repository';
import { UnitRepository } from '../../server/data/unit-repository';
import { simulatorHistorySource } from '../../server/scripts/simulator-history';
import { DemoHistory, planHistory, type HistoryOptions } from '../../server/services/demo-history';
import { RollupWorker } from '../../server/services/rollup-worker';
import { UnitDirectory } from '../../server/services/unit-directory';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
/** "now" of the first fill: a winter morning, so the full-rate day has a night and a day. */
const T = Date.parse('2026-12-03T09:00:07Z');
/** Few units of one site (the sky is built per site): its weather-station unit, its trap-prone unit and one more. */
const SERIALS = ['QED-2401', 'QED-2403', 'QED-2405'];
const OPTIONS: Omit<HistoryOptions, 'log'> = { seed: '7', fullRateDays: 1, rollupDays: 3, faults: true, serials: SERIALS };

function historyOn(t: TestDatabase, lines: string[] = []) {
  const telemetry = new TelemetryRepository(t.db);
  const units = new UnitDirectory(new UnitRepository(t.db), new HoldRepository(t.db));
  const rollups = new RollupWorker(telemetry, units, pino({ level: 'silent' }));
  const history = new DemoHistory(
    new HistoryRepository(t.db),
    telemetry,
    new AlarmRepository(t.db),
    rollups,
    units,
    simulatorHistorySource(),
    { ...OPTIONS, log: (l) => lines.push(l) },
  );
  return { history, rollups, units };
}

const count = async (t: TestDatabase, table: string) => Number(((await t.db(table).count({ n: '*' })) as [{ n: number }])[0].n);
const TABLES = ['telemetry', 'telemetry_1m', 'telemetry_15m', 'energy_daily', 'weather', 'unit_events', 'alarms'];
const counts = async (t: TestDatabase) => Object.fromEntries(await Promise.all(TABLES.map(async (x) => [x, await count(t, x)])));
const unitId = async (t: TestDatabase, serial: string) => ((await t.db('units').where({ serial }).first('id')) as { id: number }).id;

/** Checksum of a unit's raw rows (every column, in time order). */
async function unitChecksum(t: TestDatabase, serial: string): Promise<string> {
  const rows = await t
    .db('telemetry')
    .where({ unit_id: await unitId(t, serial) })
    .orderBy('ts');
  return createHash('sha256').update(JSON.stringify(rows)).digest('hex');
}

let a: TestDatabase;
let b: TestDatabase;
let firstCounts: Record<string, number>;
/** Checksum of each chosen unit's raw rows right after the first fill (later tests add to database a). */
const firstChecksums: Record<string, string> = {};
const log: string[] = [];

beforeAll(async () => {
  a = await createTestDatabase({ seed: true });
  b = await createTestDatabase({ seed: true });
  await historyOn(a, log).history.fill(T);
  firstCounts = await counts(a);
  for (const serial of SERIALS) firstChecksums[serial] = await unitChecksum(a, serial);
}, 120_000);

afterAll(async () => {
  await a?.drop();
  await b?.drop();
});

describe('the demo history: first seeding', () => {
  it('has the last day at full rate for every chosen unit, rollups back to the rollup days, and says which day it loads', async () => {
    for (const serial of SERIALS) {
      const id = await unitId(a, serial);
      const r = (await a.db('telemetry').where({ unit_id: id }).count({ n: '*' }).min({ first: 'ts' }).max({ last: 'ts' }).first()) as {
        n: number;
        first: Date;
        last: Date;
      };
      // One report every 5 s over the window that starts at the quarter-hour after a day before T.
      const expected = (T - Math.ceil((T - DAY) / 900_000) * 900_000) / 5000;
      expect(Math.abs(Number(r.n) - expected)).toBeLessThanOrEqual(1);
      expect(new Date(r.first).getTime()).toBeGreaterThanOrEqual(T - DAY);
      expect(new Date(r.last).getTime()).toBeLessThan(T);
      const q = (await a.db('telemetry_15m').where({ unit_id: id }).min({ first: 'bucket' }).first()) as { first: Date };
      expect(new Date(q.first).getTime()).toBe(Math.floor((T - 3 * DAY) / 900_000) * 900_000);
    }
    // Units not chosen get nothing.
    expect(
      await a
        .db('telemetry')
        .whereNotIn('unit_id', await a.db('units').whereIn('serial', SERIALS).pluck('id'))
        .first(),
    ).toBeUndefined();
    expect(firstCounts['weather']).toBeGreaterThan(3 * 96);
    expect(log).toContain('history: day 1 of 1 (full rate)');
    const p = await new HistoryRepository(a.db).latest();
    expect(p).toMatchObject({ state: 'done', daysTotal: 1, daysDone: 1 });
  });

  it('rolls the full-rate day up exactly as the live rollup worker does from the same raw rows', async () => {
    const from = new Date(Math.ceil((T - DAY) / 900_000) * 900_000);
    const ids = await a.db('units').whereIn('serial', SERIALS).pluck('id');
    // The site's local date at `from` (09:00 UTC) is the UTC date.
    const day = from.toISOString().slice(0, 10);
    const snapshot = async () => ({
      m: await a.db('telemetry_1m').whereIn('unit_id', ids).andWhere('bucket', '>=', from).orderBy(['unit_id', 'bucket']),
      q: await a.db('telemetry_15m').whereIn('unit_id', ids).andWhere('bucket', '>=', from).orderBy(['unit_id', 'bucket']),
      d: await a.db('energy_daily').whereIn('unit_id', ids).andWhere('local_date', '>=', day).orderBy(['unit_id', 'local_date']),
    });
    const loaded = await snapshot();
    expect(loaded.m.length).toBeGreaterThan(3 * 1400);
    // Recompute with the worker's own path: every stored report marked, one pass.
    await a.db('telemetry_1m').whereIn('unit_id', ids).delete();
    await a.db('telemetry_15m').whereIn('unit_id', ids).andWhere('bucket', '>=', from).delete();
    await a.db('energy_daily').whereIn('unit_id', ids).andWhere('local_date', '>=', day).delete();
    const { rollups, units } = historyOn(a);
    await units.load();
    const raw: { unit_id: number; ts: Date }[] = await a.db('telemetry').whereIn('unit_id', ids).select('unit_id', 'ts');
    rollups.markStored(raw.map((r) => ({ unitId: r.unit_id, tsMs: new Date(r.ts).getTime() })));
    await rollups.runOnce({ includeOpenMinutes: true });
    const again = await snapshot();
    expect(again.m).toEqual(loaded.m);
    expect(again.q).toEqual(loaded.q);
    expect(again.d).toEqual(loaded.d);
  });

  it('stores the past alarms cleared, none open, with the evidence of the raise', async () => {
    const rows = await a.db('alarms').select('state', 'cleared_at', 'raised_at', 'first_seen_at', 'evidence', 'kind');
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      expect(r.state).toBe('cleared');
      expect(new Date(r.cleared_at).getTime()).toBeLessThanOrEqual(T);
      expect(new Date(r.raised_at).getTime()).toBeGreaterThanOrEqual(new Date(r.first_seen_at).getTime());
      const e = typeof r.evidence === 'string' ? JSON.parse(r.evidence) : r.evidence;
      expect(e.generatedPast).toBe(true);
    }
  });
});

describe('the history repository', () => {
  it('bulk-loads times to the millisecond in UTC, NULLs as NULL, and skips rows whose key exists', async () => {
    const repo = new HistoryRepository(b.db);
    const siteId = ((await b.db('sites').first('id')) as { id: number }).id;
    const row = {
      site_id: siteId,
      ts: new Date('2020-02-29T23:59:59.123Z'),
      ghi_wm2: 1.5,
      dhi_wm2: null,
      air_temp_c: -2,
      wind_ms: 3,
      gust_ms: 4,
    };
    expect(await repo.insertWeather([row])).toBe(1);
    expect(await repo.insertWeather([row, { ...row, ts: new Date('2020-02-29T23:59:59.124Z') }])).toBe(1);
    const back = await b.db('weather').where('ts', '<', new Date('2021-01-01')).orderBy('ts');
    expect(back.map((r: { ts: Date }) => new Date(r.ts).toISOString())).toEqual(['2020-02-29T23:59:59.123Z', '2020-02-29T23:59:59.124Z']);
    expect(back[0]).toMatchObject({ dhi_wm2: null, air_temp_c: -2, ghi_wm2: 1.5 });
    await expect(repo.insertWeather([{ ...row, ghi_wm2: Number.NaN }])).rejects.toThrow(/not a finite number/);
    await b.db('weather').where('ts', '<', new Date('2021-01-01')).delete();
  });
});

describe('the demo history: re-runs and restarts', () => {
  it('adds nothing when run again for the same now, nor when a window is loaded twice', async () => {
    const { history } = historyOn(a);
    expect((await history.fill(T)).plan).toBeNull();
    expect(await counts(a)).toEqual(firstCounts);
    const again = await history.loadFullRate(T - 2 * HOUR, T - HOUR, T, false);
    expect(again.rawRows).toBe(0);
    expect(again.alarms).toBe(0);
    expect(await counts(a)).toEqual(firstCounts);
  });

  it('fills a 3 h gap at full rate: every unit reports across it, nothing doubled, no alarm left open', async () => {
    const before = await a.db('telemetry').max({ ts: 'ts' }).first();
    const lastMs = new Date((before as { ts: Date }).ts).getTime();
    await historyOn(a).history.fill(T + 3 * HOUR);
    for (const serial of SERIALS) {
      const ts: number[] = (
        await a
          .db('telemetry')
          .where({ unit_id: await unitId(a, serial) })
          .andWhere('ts', '>=', new Date(lastMs - HOUR))
          .orderBy('ts')
          .pluck('ts')
      ).map((d: Date) => new Date(d).getTime());
      const gaps = ts.slice(1).map((x, i) => x - ts[i]!);
      expect(Math.max(...gaps)).toBeLessThanOrEqual(10_000);
      expect(ts.at(-1)!).toBeGreaterThan(T + 3 * HOUR - 10_000);
    }
    // No minute holds more reports than a unit sends, no quarter more minutes than it has.
    expect(await a.db('telemetry_1m').where('samples', '>', 12).first()).toBeUndefined();
    expect(await a.db('telemetry_15m').where('minutes', '>', 15).first()).toBeUndefined();
    expect(await a.db('alarms').where({ state: 'active' }).orWhereNull('cleared_at').first()).toBeUndefined();
  });

  it('fills a gap longer than the full-rate days with full rate for the last days and rollups before', async () => {
    const now = T + 3 * HOUR + 3 * DAY;
    const { plan } = await historyOn(a).history.fill(now);
    expect(plan!.firstFromMs).toBe(Math.ceil((now - DAY) / 900_000) * 900_000);
    const id = await unitId(a, 'QED-2405');
    const rawInGap = await a
      .db('telemetry')
      .where({ unit_id: id })
      .andWhere('ts', '>=', new Date(T + 4 * HOUR))
      .andWhere('ts', '<', new Date(now - DAY - HOUR))
      .first();
    expect(rawInGap).toBeUndefined();
    const quarters = Number(
      (
        (await a
          .db('telemetry_15m')
          .where({ unit_id: id })
          .andWhere('bucket', '>=', new Date(T + 4 * HOUR))
          .andWhere('bucket', '<', new Date(now - DAY - HOUR))
          .count({ n: '*' })) as [{ n: number }]
      )[0].n,
    );
    // Every quarter of the gap has a row but for the unit's downtime.
    expect(quarters).toBeGreaterThan(0.9 * ((now - DAY - HOUR - (T + 4 * HOUR)) / 900_000));
    const last = (await a.db('telemetry').where({ unit_id: id }).max({ ts: 'ts' }).first()) as { ts: Date };
    expect(new Date(last.ts).getTime()).toBeGreaterThan(now - 10_000);
  });

  it('plans a gap of more than 7 days as 7 days of full rate (1 before the server starts, 6 in the background) and rollups before', () => {
    const now = Date.parse('2026-12-03T12:00:00Z');
    const p = planHistory(now, now - 10 * DAY, { fullRateDays: 7, rollupDays: 396 })!;
    expect(p.firstFromMs).toBe(now - DAY);
    expect([p.backgroundFromMs, p.backgroundToMs]).toEqual([now - 7 * DAY, now - DAY]);
    expect([p.rollupFromMs, p.rollupToMs]).toEqual([now - 10 * DAY + 900_000, now - DAY]);
    expect(p.daysTotal).toBe(7);
    expect(planHistory(now, now - 3000, { fullRateDays: 7, rollupDays: 396 })).toBeNull();
    const first = planHistory(now, null, { fullRateDays: 0, rollupDays: 396 })!;
    expect([first.daysTotal, first.rollupFromMs, first.rollupToMs]).toEqual([0, now - 396 * DAY, now]);
  });
});

describe('the demo history: determinism', () => {
  it('gives the same rows for the same seed and now', async () => {
    await historyOn(b).history.fill(T);
    for (const serial of SERIALS) expect(await unitChecksum(b, serial)).toBe(firstChecksums[serial]);
    expect(await counts(b)).toEqual(firstCounts);
  }, 120_000);

  it('does a first phase again that was stopped before it finished, then measures the gap after it', async () => {
    const repo = new HistoryRepository(b.db);
    const ids: number[] = await b.db('units').whereIn('serial', SERIALS).pluck('id');
    const lastMs = (await repo.latestReportMs(ids))!;
    // As a fill stopped half-way leaves it: planned, loading, nothing stored yet.
    const id = await repo.startProgress({
      plannedAt: new Date(T + HOUR),
      lastReportAt: new Date(lastMs),
      state: 'loading',
      daysTotal: 1,
      daysDone: 0,
      backgroundFrom: null,
      backgroundTo: null,
      message: 'loading',
    });
    const lines: string[] = [];
    expect((await historyOn(b, lines).history.fill(T + HOUR + 2000)).plan).toBeNull();
    expect(lines[0]).toBe(`history: resuming the fill planned for ${new Date(T + HOUR).toISOString()}`);
    expect(lines.at(-1)).toBe('history: no gap to fill');
    expect(((await b.db('demo_history').where({ id }).first()) as { state: string }).state).toBe('done');
    for (const unitId of ids) {
      const r = (await b.db('telemetry').where({ unit_id: unitId }).max({ ts: 'ts' }).first()) as { ts: Date };
      expect(new Date(r.ts).getTime()).toBeGreaterThan(T + HOUR - 10_000);
    }
  });
});
