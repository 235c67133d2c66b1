/**
 * A demo site's statement for a past month from the demo's own generated past: the clear-sky reservoir site (Mesa Seca,
 * America/Santiago) with a short past that covers November 2026 — rollup-level rows for the month and its last day at
 * full rate, rolled up and modelled by the server's own rollup worker. The statement must be modelled, its losses must
 * add up, and its gains must have the sign the sky gives: a unit that climbs to the brightest orientation under a clear
 * sky does about as well as one pointing at the sun, and better than a fixed panel at latitude tilt (common practice:
 * two-axis tracking gains some 30–45 % a year over a fixed latitude-tilt array on a clear site, more in summer, when the
 * sun rises and sets far behind a fixed panel; from memory).
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import { AlarmRepository } from '../../server/data/alarm-repository';
import { HistoryRepository } from '../../server/data/history-repository';
import { TelemetryRepository } from '../../server/data/telemetry-repository';
import pino from 'pino';
import { simulatorHistorySource } from '../../server/scripts/simulator-history';
import { DemoHistory } from '../../server/services/demo-history';
import { QuarterModelService } from '../../server/services/quarter-model-service';
import type { MonthlyStatement } from '../../shared/contracts/statements';
import { demoSerials } from '../../shared/demo-world';
import { startTestStack } from '../helpers/test-stack';

/** 02:00 UTC on 1 December = 23:00 on 30 November in Santiago (UTC−3 in summer): the full-rate day is November's last. */
const NOW = Date.parse('2026-12-01T02:00:00Z');
const SERIALS = demoSerials().filter((s) => s.startsWith('TMS-'));

let stack: Awaited<ReturnType<typeof startTestStack>>;
let siteId = 0;
let s: MonthlyStatement;

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const db = stack.db;
  const telemetry = new TelemetryRepository(db);
  const modeller = new QuarterModelService(telemetry, stack.siteModel, pino({ level: 'silent' }));
  const history = new DemoHistory(
    new HistoryRepository(db),
    telemetry,
    new AlarmRepository(db),
    stack.rollups,
    stack.units,
    simulatorHistorySource(),
    { seed: '3', fullRateDays: 1, rollupDays: 36, faults: true, serials: SERIALS, log: () => {}, modeller },
  );
  await history.fill(NOW);
  // The first phase leaves the full-rate day's model columns to the background phase.
  expect(await history.modelFullRate(NOW - 2 * 86_400_000, NOW)).toBeGreaterThan(3 * 90);
  siteId = ((await db('sites').where({ name: 'Mesa Seca Reservoir' }).first('id')) as { id: number }).id;
  const admin = request.agent(stack.http);
  await admin.post('/api/auth/sign-in').send({ email: 'admin@saltmarsh.example', password: DEMO_PASSWORD }).expect(200);
  s = (await admin.get(`/api/sites/${siteId}/statements/2026-11`).expect(200)).body as MonthlyStatement;
}, 180_000);

afterAll(async () => {
  await stack?.stop();
});

describe("a demo site's statement for a past month of the generated past", () => {
  it('covers the month with modelled buckets, from both the rollup-level days and the full-rate day', async () => {
    expect(SERIALS.length).toBe(3);
    expect(s.partial).toBe(false);
    expect(s.site.energyKwh).toBeGreaterThan(0);
    expect(s.site.modelledShare).toBeGreaterThan(0.95);
    const ids = await stack.db('units').whereIn('serial', SERIALS).pluck('id');
    // The full-rate day's buckets are modelled as the live rollup worker does (QuarterModelService); earlier ones come modelled.
    const fullRate = await stack
      .db('telemetry_15m')
      .whereIn('unit_id', ids)
      .andWhere('bucket', '>=', new Date(NOW - 20 * 3_600_000))
      .andWhere('bucket', '<', new Date(NOW - 3_600_000))
      .select('model_best_wm2', 'model_unit_wm2', 'settled_min', 'module_temp_avg_c');
    expect(fullRate.length).toBeGreaterThan(3 * 70);
    expect(fullRate.every((r) => r.model_best_wm2 !== null && r.module_temp_avg_c !== null && r.settled_min !== null)).toBe(true);
    const early = await stack
      .db('telemetry_15m')
      .whereIn('unit_id', ids)
      .andWhere('bucket', '>=', new Date('2026-11-05T00:00:00Z'))
      .andWhere('bucket', '<', new Date('2026-11-06T00:00:00Z'));
    expect(early.length).toBeGreaterThan(3 * 90);
    for (const r of early) {
      expect(r.model_best_wm2).toBeGreaterThanOrEqual(r.model_unit_wm2);
      expect(r.seeking_min + r.settled_min + r.scanning_min + r.stowed_min + r.held_min + r.fault_min).toBeCloseTo(r.minutes, 2);
    }
  });

  it('has losses whose parts add up to modelled minus measured, for the site and each unit', () => {
    for (const f of [s.site, ...s.units]) {
      const l = f.losses;
      expect(l.modelledBestKwh).toBeGreaterThan(l.measuredKwh);
      const parts = l.trappedKwh + l.downtimeKwh + l.heldKwh + l.stowedKwh + l.soilingKwh + l.residualKwh;
      expect(parts).toBeCloseTo(l.modelledBestKwh - l.measuredKwh, 1);
    }
  });

  it('gains about nothing over a sun-following twin and clearly over a fixed-tilt twin under the clear sky', () => {
    const g = s.site.gains;
    expect(g.gainOverSunPct).not.toBeNull();
    expect(Math.abs(g.gainOverSunPct!)).toBeLessThan(5);
    expect(g.gainOverFixedPct).toBeGreaterThan(15);
    expect(g.gainOverFixedPct).toBeLessThan(80);
  });
});
