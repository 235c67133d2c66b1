import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import type { Telemetry } from '../../shared/contracts/wire';
import { demoFleetSites } from '../../simulator/demo-fleet';
import type { FleetSiteSpec } from '../../simulator/fleet';
import { fullRateHistory, rollupModelHistory, type ModelQuarter, type TimedMessage } from '../../simulator/history';

const HOUR = 3_600_000;
/** Two units of each of the first four demo sites (the first carries the station outdoors). */
const sites = (perSite = 2): FleetSiteSpec[] =>
  demoFleetSites()
    .slice(0, 4)
    .map((s) => ({ ...s, units: s.units.slice(0, perSite) }));
const UNITS = sites().reduce((n, s) => n + s.units.length, 0);
const indoor = new Set(sites().flatMap((s) => (s.site.indoor ? s.units.map((u) => u.serial) : [])));
const hash = (x: unknown) => createHash('sha256').update(JSON.stringify(x)).digest('hex');

function full(seed: string, fromMs: number, toMs: number, spec = sites()) {
  const out: TimedMessage[] = [];
  const truth = fullRateHistory(spec, { fromMs, toMs, seed, faults: { 'comms-loss': 2 } }, (b) => out.push(...b));
  return { out, truth };
}

function model(seed: string, fromMs: number, toMs: number, faults = {}) {
  const quarters: ModelQuarter[] = [];
  const truth = rollupModelHistory(sites(), { fromMs, toMs, seed, faults }, (q) => quarters.push(...q));
  return { quarters, truth };
}

describe('full-rate history', () => {
  const from = Date.parse('2026-06-10T10:00:00Z');

  it('is the same for the same seed and window, and differs for another seed', () => {
    const a = full('5', from, from + HOUR);
    expect(hash(full('5', from, from + HOUR))).toBe(hash(a));
    expect(hash(full('6', from, from + HOUR).out)).not.toBe(hash(a.out));
  });

  it('hands over only messages stamped in the window, on one 5 s grid that adjoining windows share', () => {
    const a = full('5', from, from + HOUR).out;
    const b = full('5', from + HOUR, from + 2 * HOUR).out;
    const reports = [...a, ...b].filter((m) => m.message.leaf === 'telemetry').map((m) => m.message.payload as Telemetry);
    expect(reports.length).toBe(UNITS * 2 * 720);
    const ts = reports.map((t) => Date.parse(t.ts));
    expect(Math.min(...ts)).toBeGreaterThanOrEqual(from);
    expect(Math.max(...ts)).toBeLessThan(from + 2 * HOUR);
    expect(new Set(ts.map((t) => t % 5000)).size).toBe(1);
    // Weather from the outdoor stations, none indoors.
    const stations = new Set([...a, ...b].filter((m) => m.message.leaf === 'weather').map((m) => m.message.serial));
    const expected = sites().flatMap((s) => s.units.filter((u) => u.weatherStation && !s.site.indoor).map((u) => u.serial));
    expect(expected.length).toBeGreaterThan(0);
    expect([...stations].sort()).toEqual(expected.sort());
  });
});

describe('rollup-level history', () => {
  const from = Date.parse('2026-06-08T00:00:00Z');

  it('is the same for the same seed and window', () => {
    const a = model('5', from, from + 2 * 24 * HOUR, { stall: 1 });
    expect(hash(model('5', from, from + 2 * 24 * HOUR, { stall: 1 }))).toBe(hash(a));
  });

  it('gives every unit every quarter but its downtime, nothing at night outdoors, energy = power × minutes', () => {
    const { quarters, truth } = model('5', from, from + 2 * 24 * HOUR, { 'comms-loss': 1 });
    expect(truth.length).toBeGreaterThan(0);
    const missing = UNITS * 192 - quarters.length;
    // A loss of d minutes covers at least ⌊d/15⌋ − 1 whole quarters, which then have no row.
    const downQuarters = truth.reduce(
      (n, r) => n + Math.max(0, Math.floor((Date.parse(r.end!) - Date.parse(r.start)) / (15 * 60_000)) - 1),
      0,
    );
    expect(downQuarters).toBeGreaterThan(0);
    expect(missing).toBeGreaterThanOrEqual(downQuarters);
    for (const q of quarters) {
      expect(q.minutes).toBeGreaterThan(0);
      expect(q.minutes).toBeLessThanOrEqual(15);
      expect(q.samples).toBe(q.minutes * 12);
      expect(q.energyWh).toBeCloseTo((q.dcPowerAvgW * q.minutes) / 60, 9);
    }
    // Local solar midnight in June at each outdoor site (the first four are at 50–54° N): the sun is down.
    const lon = new Map(sites().flatMap((s) => s.units.map((u) => [u.serial, s.site.longitudeDeg] as const)));
    const solarHour = (q: ModelQuarter) => (((q.bucketMs / 3_600_000 + lon.get(q.serial)! / 15) % 24) + 24) % 24;
    const night = quarters.filter((q) => !indoor.has(q.serial) && (solarHour(q) < 0.5 || solarHour(q) > 23.5));
    expect(night.length).toBeGreaterThan(0);
    expect(night.every((q) => q.energyWh === 0)).toBe(true);
    // Summer noon outdoors: a bright orientation is reachable.
    const noon = quarters.filter((q) => !indoor.has(q.serial) && Math.abs(solarHour(q) - 12) < 0.5);
    expect(Math.max(...noon.map((q) => q.poaAvgWm2))).toBeGreaterThan(500);
  });

  it("agrees with the full-rate fleet on a summer day's energy within a quarter (same sky, same units)", () => {
    const dayFrom = Date.parse('2026-06-10T04:00:00Z');
    const dayTo = dayFrom + 14 * HOUR;
    let fullWh = 0;
    fullRateHistory(sites(), { fromMs: dayFrom, toMs: dayTo, seed: '3' }, (b) => {
      for (const { message } of b) if (message.leaf === 'telemetry') fullWh += ((message.payload as Telemetry).dcPowerW * 5) / 3600;
    });
    const modelWh = model('3', dayFrom, dayTo).quarters.reduce((n, q) => n + q.energyWh, 0);
    expect(modelWh / fullWh).toBeGreaterThan(0.8);
    expect(modelWh / fullWh).toBeLessThan(1.25);
  }, 60_000);

  it('carries what the statements read: modelled irradiances ordered as physics orders them, orientation, modes, module temperature', () => {
    const { quarters } = model('5', from, from + 2 * 24 * HOUR, { hunting: 2 });
    const lit = quarters.filter((q) => q.modelBestWm2 > 100);
    expect(lit.length).toBeGreaterThan(100);
    for (const q of quarters) {
      // The unit's own orientation is reachable, so it never beats the best; the measured value is its share of it.
      expect(q.modelBestWm2).toBeGreaterThanOrEqual(q.modelUnitWm2);
      expect(q.poaAvgWm2).toBeLessThanOrEqual(q.modelUnitWm2 + 1e-9);
      expect(q.seekingMin + q.settledMin + q.stowedMin).toBeCloseTo(q.minutes, 9);
      expect(q.tiltDeg).toBeGreaterThanOrEqual(0);
      expect(q.tiltDeg).toBeLessThanOrEqual(85);
      expect(q.azimuthDeg).toBeGreaterThanOrEqual(0);
      expect(q.azimuthDeg).toBeLessThan(360);
    }
    // Outdoors by day: the sun-following twin is within the unit's travel, so the best reachable is at least it (less
    // the 1° search grid); a fixed panel at latitude tilt gets less than the best (northern sites at 50–54°, June).
    for (const q of lit.filter((x) => !indoor.has(x.serial))) {
      expect(q.modelSunWm2).toBeLessThanOrEqual(q.modelBestWm2 * 1.01);
      expect(q.modelFixedWm2).toBeLessThanOrEqual(q.modelBestWm2 * 1.01);
    }
    // Hunting shows as seeking minutes, and a lit module runs warmer than one at night.
    expect(quarters.some((q) => q.seekingMin > 0)).toBe(true);
    const meanT = (xs: ModelQuarter[]) => xs.reduce((n, q) => n + q.moduleTempC, 0) / xs.length;
    expect(meanT(lit.filter((q) => !indoor.has(q.serial)))).toBeGreaterThan(meanT(quarters.filter((q) => q.modelBestWm2 === 0)) + 5);
  });

  it('lies flat in wind stow: stowed minutes, tilt 0 and the horizontal irradiance at the unit', () => {
    const gusty = demoFleetSites().find((s) => s.scenario === 'gusty')!;
    const spec = [{ ...gusty, units: gusty.units.slice(0, 1) }];
    const quarters: ModelQuarter[] = [];
    const dayFrom = Date.parse('2026-03-10T00:00:00Z');
    rollupModelHistory(spec, { fromMs: dayFrom, toMs: dayFrom + 7 * 24 * HOUR, seed: '2' }, (q) => quarters.push(...q));
    const stowed = quarters.filter((q) => q.stowedMin === 15);
    expect(stowed.length).toBeGreaterThan(0);
    for (const q of stowed) {
      expect(q.tiltDeg).toBe(0);
      expect(q.settledMin).toBe(0);
      expect(q.poaAvgWm2).toBeCloseTo(q.modelUnitWm2, 9);
    }
    // A bright stowed quarter gets less at its flat orientation than at its best.
    const bright = stowed.filter((q) => q.modelBestWm2 > 300);
    if (bright.length) expect(bright.every((q) => q.modelUnitWm2 < q.modelBestWm2)).toBe(true);
  });
});
