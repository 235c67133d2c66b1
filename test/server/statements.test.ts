/**
 * Monthly statements over a hand-built month: a test site in Europe/Berlin with two units whose 15-minute rollups are
 * written directly (every bucket of June 2026; daylight 06:00–18:00 local with modelled best 800 W/m², fixed-tilt twin
 * 600, sun-following twin 760). Unit A carries a 1-h wind stow, a 1-h hold, a 1-h outage covered by a ticket, a 2-h trap
 * on a lesser peak (400 W/m²) and a whole day without data; unit B is clean. Expected values are derived by hand from
 * the definitions (IEC 61724-1 yields and PR; availability as in physics.md §7).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { signedIn, type Agent } from '../helpers/signed-in';
import { startTestStack } from '../helpers/test-stack';
import { localMonth } from '../../shared/pv-performance';
import type { MonthlyStatement, StatementMonthList, StatementTrend } from '../../shared/contracts/statements';
import { MODULE_POWER_TEMP_COEFF_PER_K } from '../../shared/contracts/pv-module';

let stack: Awaited<ReturnType<typeof startTestStack>>;
let siteId = 0;
let otherSiteId = 0;
const ids: Record<'A' | 'B' | 'C', number> = { A: 0, B: 0, C: 0 };
const P0_WP = 420;
const E0_WH = (P0_WP / 1000) * 0.8 * 800 * 0.25; // a normal daylight bucket: P0 × PR 0.8 × 800 W/m² × 0.25 h = 67.2 Wh
const Q = 15 * 60_000;

const signIn = signedIn(() => stack.http);
const as = async (email: string): Promise<Agent> => (await signIn(email)).agent;
const ADMIN = 'admin@saltmarsh.example';
const OWNER = 'owner@quillmoor.example';
const OTHER_OWNER = 'owner@fenwicklane.example';

/** Local hour and day (Europe/Berlin is UTC+2 in June). */
const localHour = (ms: number) => new Date(ms + 2 * 3600_000).getUTCHours() + new Date(ms + 2 * 3600_000).getUTCMinutes() / 60;
const localDay = (ms: number) => new Date(ms + 2 * 3600_000).getUTCDate();

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const db = stack.db;
  const owner = await db('owners').where({ name: 'Quillmoor Energy Cooperative' }).first('id');
  siteId = (
    await db('sites').insert({
      owner_id: owner.id,
      name: 'Statement test roof',
      latitude_deg: 52.52,
      longitude_deg: 13.4,
      elevation_m: 40,
      time_zone: 'Europe/Berlin',
    })
  )[0]!;
  otherSiteId = (
    await db('sites as s').join('owners as o', 'o.id', 's.owner_id').where('o.name', 'Fenwick Lane Schools Trust').first('s.id')
  ).id;
  for (const k of ['A', 'B', 'C'] as const) {
    ids[k] = (
      await db('units').insert({
        serial: `STM-TEST-${k}`,
        site_id: siteId,
        rated_power_wp: P0_WP,
        detector_tilt_deg: 10,
        firmware: 'test',
        device_secret_hash: 'sha256:00',
      })
    )[0]!;
  }
  const month = localMonth('2026-06', 'Europe/Berlin');
  const rows: Record<string, unknown>[] = [];
  for (let b = month.fromMs; b < month.toMs; b += Q) {
    const h = localHour(b);
    const day = localDay(b);
    const lit = h >= 6 && h < 18;
    for (const k of ['A', 'B'] as const) {
      const row = {
        unit_id: ids[k],
        bucket: new Date(b),
        minutes: 15,
        samples: 180,
        poa_avg_wm2: lit ? 800 : 0,
        poa_max_wm2: lit ? 800 : 0,
        dc_power_avg_w: lit ? E0_WH * 4 : 0,
        energy_wh: lit ? E0_WH : 0,
        module_temp_avg_c: lit ? 45 : 15,
        tilt_avg_deg: 30,
        azimuth_avg_deg: 180,
        seeking_min: 0,
        settled_min: 15,
        scanning_min: 0,
        stowed_min: 0,
        held_min: 0,
        fault_min: 0,
        model_unit_wm2: lit ? 800 : 0,
        model_best_wm2: lit ? 800 : 0,
        model_fixed_wm2: lit ? 600 : 0,
        model_sun_wm2: lit ? 760 : 0,
      };
      if (k === 'A') {
        if (day === 20) continue; // a whole day without data
        if (day === 12 && h >= 10 && h < 11) continue; // a 1-h outage (covered by a ticket below)
        if (day === 10 && h >= 10 && h < 11) Object.assign(row, { stowed_min: 15, settled_min: 0, energy_wh: 0, poa_avg_wm2: 0 });
        if (day === 11 && h >= 10 && h < 11) Object.assign(row, { held_min: 15, settled_min: 0, energy_wh: 0, poa_avg_wm2: 0 });
        if (day === 14 && h >= 10 && h < 12) Object.assign(row, { model_unit_wm2: 400, poa_avg_wm2: 400, energy_wh: E0_WH / 2 });
      }
      rows.push(row);
    }
  }
  // Unit C: older rows without the statement columns (no modes, temperature or model), daylight of 1–5 June only.
  for (let b = month.fromMs; b < month.toMs; b += Q) {
    const h = localHour(b);
    if (localDay(b) > 5 || h < 6 || h >= 18) continue;
    rows.push({
      unit_id: ids.C,
      bucket: new Date(b),
      minutes: 15,
      samples: 180,
      poa_avg_wm2: 800,
      poa_max_wm2: 800,
      dc_power_avg_w: E0_WH * 4,
      energy_wh: E0_WH,
    });
  }
  for (let i = 0; i < rows.length; i += 2000) await db('telemetry_15m').insert(rows.slice(i, i + 2000));
  const opened = new Date(Date.parse('2026-06-12T07:55:00Z'));
  await db('tickets').insert({
    site_id: siteId,
    unit_id: ids.A,
    kind: 'manual',
    severity: 'P2',
    title: 'Owner asked for a shutdown',
    state: 'closed',
    opened_at: opened,
    acknowledge_due_at: opened,
    on_site_due_at: opened,
    fix_due_at: opened,
    resolved_at: new Date(Date.parse('2026-06-12T09:05:00Z')),
    closed_at: new Date(Date.parse('2026-06-12T09:10:00Z')),
    availability_category: 'requested-shutdown',
    parts: '[]',
  });
}, 60_000);
afterAll(async () => {
  await stack?.stop();
});

let statement: MonthlyStatement;
const unit = (k: 'A' | 'B' | 'C') => statement.units.find((u) => u.unitId === ids[k])!;

describe('monthly statement of a hand-built month', () => {
  beforeAll(async () => {
    statement = (await (await as(OWNER)).get(`/api/sites/${siteId}/statements/2026-06`).expect(200)).body;
  });

  it('states the month in the site calendar and the assumptions', () => {
    expect(statement.from).toBe('2026-06-01T00:00:00+02:00');
    expect(statement.to).toBe('2026-07-01T00:00:00+02:00');
    expect(statement.hours).toBe(720);
    expect(statement.partial).toBe(false);
    expect(statement.assumptions.energy).toMatch(/DC/);
    expect(statement.assumptions.gammaPctPerK).toBeCloseTo(MODULE_POWER_TEMP_COEFF_PER_K * 100, 9);
    expect(statement.assumptions.daylightThresholdWm2).toBe(50);
    expect(statement.days).toHaveLength(30);
  });

  it('gives the clean unit PR 0.8 and PR_STC 0.8 / (1 + γ·20 K) (IEC 61724-1 definitions)', () => {
    const b = unit('B');
    expect(b.energyKwh).toBeCloseTo((1440 * E0_WH) / 1000, 3); // 30 days × 48 daylight buckets
    expect(b.hiKwhM2).toBeCloseTo(1440 * 0.2, 3);
    expect(b.yfH).toBeCloseTo(b.energyKwh / 0.42, 3);
    expect(b.pr).toBeCloseTo(0.8, 4);
    expect(b.prStc).toBeCloseTo(0.8 / (1 + MODULE_POWER_TEMP_COEFF_PER_K * 20), 4);
    expect(b.completeness).toBe(1);
    expect(b.availability.timeRaw).toBe(1);
  });

  it('reports the data gap as completeness and invents no energy for it', () => {
    const a = unit('A');
    expect(a.completeness).toBeCloseTo((2880 - 4 - 96) / 2880, 4);
    const day20 = statement.days.find((d) => d.date === '2026-06-20')!;
    expect(day20.energyKwh).toBeCloseTo((48 * E0_WH) / 1000, 3); // unit B only
    expect(day20.completeness).toBeCloseTo(1 / 3, 4); // of three units only B reported that day
    const normal = 1440 - 4 - 4 - 4 - 48 - 8;
    expect(a.energyKwh).toBeCloseTo((normal * E0_WH + (8 * E0_WH) / 2) / 1000, 3);
  });

  it('counts availability over daylight with the stow, the hold and the ticket excused (contractual) and the gap not', () => {
    const a = unit('A').availability;
    expect(a.daylightH).toBe(360);
    expect(a.downH).toBe(15); // stow 1 h + hold 1 h + outage 1 h + the 12 daylight hours of day 20
    expect(a.excludedH).toBe(3); // stow, hold, and the outage its ticket calls a requested shutdown
    expect(a.timeRaw).toBeCloseTo(345 / 360, 4);
    expect(a.timeContractual).toBeCloseTo(348 / 360, 4);
    const lostPerHour = 0.8 * 0.42 * 0.8; // median PR × P0 × 800 W/m² × 1 h [kWh]
    expect(a.lostKwh).toBeCloseTo(15 * lostPerHour, 3);
    expect(a.energyContractual).toBeCloseTo(unit('A').energyKwh / (unit('A').energyKwh + 12 * lostPerHour), 4);
  });

  it('lists each excluded interval with its category and source; the ticket wins over comms', () => {
    const of = (date: string) => statement.exclusions.filter((e) => e.serial === 'STM-TEST-A' && e.from.startsWith(date));
    expect(of('2026-06-10')).toEqual([
      expect.objectContaining({
        from: '2026-06-10T10:00:00+02:00',
        to: '2026-06-10T11:00:00+02:00',
        minutes: 60,
        category: 'out-of-environmental-specification',
        source: 'wind-stow',
        excused: true,
      }),
    ]);
    expect(of('2026-06-11')).toEqual([
      expect.objectContaining({ minutes: 60, category: 'scheduled-maintenance', source: 'hold', excused: true }),
    ]);
    expect(of('2026-06-12')).toEqual([
      expect.objectContaining({
        minutes: 60,
        category: 'requested-shutdown',
        source: 'ticket',
        ticketId: expect.any(Number),
        excused: true,
      }),
    ]);
    expect(of('2026-06-20')).toEqual([
      expect.objectContaining({
        from: '2026-06-20T06:00:00+02:00',
        to: '2026-06-20T18:00:00+02:00',
        minutes: 720,
        category: 'forced-outage',
        source: 'comms',
        excused: false,
      }),
    ]);
    expect(statement.exclusions.filter((e) => e.serial === 'STM-TEST-B')).toEqual([]);
  });

  it('splits losses into the injected parts (each within 5 %) and a residual near zero', () => {
    const l = unit('A').losses;
    const perHour = 0.8 * 0.42 * 0.8;
    const within = (x: number, want: number) => expect(Math.abs(x - want), `${x} vs ${want}`).toBeLessThanOrEqual(0.05 * want);
    within(l.trappedKwh, (8 * E0_WH) / 2 / 1000); // 8 buckets at half the best: each gap is E0 × 800/400 − E0/2 = E0/2
    within(l.stowedKwh, perHour);
    within(l.heldKwh, perHour);
    within(l.downtimeKwh, 13 * perHour); // the 1-h outage and the 12 daylight hours without data
    expect(Math.abs(l.residualKwh)).toBeLessThanOrEqual(0.02 * l.modelledBestKwh);
    const parts = l.trappedKwh + l.downtimeKwh + l.heldKwh + l.stowedKwh + l.soilingKwh + l.residualKwh;
    expect(parts).toBeCloseTo(l.modelledBestKwh - l.measuredKwh, 2);
  });

  it('gains over the twins by the ratio method (800 vs 600 and 760 W/m²)', () => {
    const g = unit('B').gains;
    expect(g.gainOverFixedPct).toBeCloseTo((800 / 600 - 1) * 100, 1);
    expect(g.gainOverSunPct).toBeCloseTo((800 / 760 - 1) * 100, 1);
    expect(unit('B').modelledShare).toBe(1);
    expect(unit('A').modelledShare).toBe(1); // buckets without a row borrow the site's modelled values
    // Twins of unit A: its missing buckets (1 h + 12 h) use the median PR (0.8) × P0 × the twin's modelled irradiance.
    expect(unit('A').gains.fixedTwinKwh).toBeCloseTo(((1440 - 8) * E0_WH * 600) / 800 / 1000 + (8 * (E0_WH / 2) * 600) / 400 / 1000, 2);
  });

  it('takes rows without the statement columns: energy and PR count, PR_STC has none, and the share modelled is stated', () => {
    const c = unit('C');
    expect(c.energyKwh).toBeCloseTo((5 * 48 * E0_WH) / 1000, 3);
    expect(c.pr).toBeCloseTo(0.8, 4);
    expect(c.prStc).toBeNull();
    // Its own rows carry no model; the 25 days without rows borrow the site's modelled values.
    expect(c.modelledShare).toBeCloseTo((1440 - 5 * 48) / 1440, 4);
    expect(c.completeness).toBeCloseTo((5 * 48) / 2880, 4);
    expect(statement.assumptions.notes.join(' ')).toMatch(/Modelled values cover \d+(\.\d)? % of the daylight buckets/);
  });

  it('reports the tickets of the month', () => {
    expect(statement.tickets.opened).toBe(1);
    expect(statement.tickets.closed).toBe(1);
  });
});

describe('15-minute rollup for statements', () => {
  it('stores module temperature, orientation, minutes per mode and the modelled irradiances once the bucket closes', async () => {
    // Yesterday 11:00–11:15 UTC at the test site (Berlin, daylight all year): 10 min settled, then 5 min stowed.
    const b = Math.floor((Date.now() - 86_400_000) / 86_400_000) * 86_400_000 + 11 * 3600_000;
    const raw = Array.from({ length: 90 }, (_, i) => ({
      unit_id: ids.B,
      ts: new Date(b + i * 10_000),
      seq: i,
      tilt_plus_wm2: 300,
      tilt_minus_wm2: 300,
      azimuth_plus_wm2: 300,
      azimuth_minus_wm2: 300,
      poa_wm2: 300,
      tilt_deg: i < 60 ? 40 : 0,
      azimuth_deg: i < 60 ? 170 : 190,
      cmd_tilt_deg: 40,
      cmd_azimuth_deg: 170,
      tilt_motor_a: 0,
      azimuth_motor_a: 0,
      dc_power_w: i < 60 ? 100 : 20,
      module_temp_c: 30,
      mode: i < 60 ? 'settled' : 'stowed',
      received_at: new Date(b + i * 10_000),
    }));
    await stack.db('telemetry').insert(raw);
    stack.rollups.markStored(raw.map((r) => ({ unitId: ids.B, tsMs: r.ts.getTime() })));
    await stack.rollups.runOnce();
    const q = await stack
      .db('telemetry_15m')
      .where({ unit_id: ids.B, bucket: new Date(b) })
      .first();
    expect(q.minutes).toBe(15);
    expect(q.module_temp_avg_c).toBeCloseTo(30, 6);
    expect(q.tilt_avg_deg).toBeCloseTo((10 * 40 + 5 * 0) / 15, 6);
    expect(q.azimuth_avg_deg).toBeGreaterThan(170);
    expect(q.azimuth_avg_deg).toBeLessThan(190);
    expect(q.settled_min).toBeCloseTo(10, 9);
    expect(q.stowed_min).toBeCloseTo(5, 9);
    expect(q.held_min).toBe(0);
    // No station reading: the clear-sky model. The best reachable orientation is never below the unit's own.
    expect(q.model_unit_wm2).toBeGreaterThan(0);
    expect(q.model_best_wm2).toBeGreaterThanOrEqual(q.model_unit_wm2);
    expect(q.model_best_wm2).toBeGreaterThanOrEqual(q.model_sun_wm2 - 1);
    expect(q.model_fixed_wm2).toBeGreaterThan(0);
  });
});

describe('statement API', () => {
  it('lists the months with data and serves the CSV with units in the headers', async () => {
    const list: StatementMonthList = (await (await as(OWNER)).get(`/api/sites/${siteId}/statements`).expect(200)).body;
    expect(list.months.map((m) => m.month)).toContain('2026-06');
    const csv = await (await as(ADMIN)).get(`/api/sites/${siteId}/statements/2026-06.csv`).expect(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    const lines = csv.text.split('\r\n');
    expect(lines[0]!.split(',').slice(0, 8)).toEqual([
      'site_id',
      'scope',
      'serial',
      'period_start_local',
      'period_end_local',
      'energy_dc_kWh',
      'rated_power_kWp',
      'final_yield_kWh_kWp',
    ]);
    expect(lines).toHaveLength(1 + 1 + 3 + 30 + 1); // header, site, units, days, the empty line after the last CRLF
    expect(lines[3]!.startsWith(`${siteId},unit,STM-TEST-B,2026-06-01T00:00:00+02:00,2026-07-01T00:00:00+02:00,`)).toBe(true);
    const day = lines[5]!.split(',');
    expect(day[1]).toBe('day');
    expect(day[2]).toBe(''); // no serial on a site day: empty = missing
  });

  it("keeps owners to their own sites: another owner's site answers 404, anonymous 401", async () => {
    const other = await as(OTHER_OWNER);
    await other.get(`/api/sites/${siteId}/statements`).expect(404);
    await other.get(`/api/sites/${siteId}/statements/2026-06`).expect(404);
    await other.get(`/api/sites/${siteId}/statements/2026-06.csv`).expect(404);
    await (await as(OWNER)).get(`/api/sites/${otherSiteId}/statements/2026-06`).expect(404);
    await request(stack.http).get(`/api/sites/${siteId}/statements/2026-06`).expect(401);
  });

  it('gives the trend: this month so far and the twelve before it, oldest first, June with its statement figures', async () => {
    const t = (await (await as(OWNER)).get(`/api/sites/${siteId}/statement-trend`).expect(200)).body as StatementTrend;
    expect(t.months).toHaveLength(13);
    expect(t.months[12]!.partial).toBe(true);
    const june = t.months.find((m) => m.month === '2026-06')!;
    expect(june.energyKwh).toBeCloseTo(statement.site.energyKwh, 6);
    expect(june.pr).toBe(statement.site.pr);
    expect(june.hasData).toBe(true);
    expect(t.months.filter((m) => m.month < '2026-06').every((m) => !m.hasData && m.energyKwh === 0 && m.pr === null)).toBe(true);
    await (await as(OTHER_OWNER)).get(`/api/sites/${siteId}/statement-trend`).expect(404);
  });

  it('states a daylight-saving month in the site calendar: October 2026 in Europe/Berlin has 745 hours, its 25th 25', async () => {
    const oct = (await (await as(ADMIN)).get(`/api/sites/${siteId}/statements/2026-10`).expect(200)).body as MonthlyStatement;
    expect(oct.hours).toBe(745);
    expect(oct.from).toBe('2026-10-01T00:00:00+02:00');
    expect(oct.to).toBe('2026-11-01T00:00:00+01:00');
    expect(oct.days.find((d) => d.date === '2026-10-25')!.hours).toBe(25);
    expect(oct.site.energyKwh).toBe(0);
    expect(oct.site.completeness).toBe(0);
  });

  it('names a bad month', async () => {
    const r = await (await as(ADMIN)).get(`/api/sites/${siteId}/statements/2026-13`).expect(400);
    expect(JSON.stringify(r.body)).toMatch(/calendar month/);
    await (await as(ADMIN)).get(`/api/sites/${siteId}/statements/2099-01`).expect(400);
  });
});
