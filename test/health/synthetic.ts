/** Synthetic units, skies and models for the health tests: a sun-lit landscape with a known peak, reports every 5 s. */
import type { Telemetry } from '../../shared/contracts/wire';
import { detectorReadingsWith } from '../../shared/landscape/detector-pairs';
import { normalFromTiltAzimuth, directionFromAzimuthElevation } from '../../shared/sphere/directions';
import { HealthEngine } from '../../server/health/health-engine';
import type { Alarm } from '../../server/health/alarm-types';
import type { SiteModel } from '../../server/health/site-model';
import type { UnitRef } from '../../server/health/unit-sample';

export const T0 = Date.parse('2026-06-21T10:00:00Z');

/** Beam of `beamWm2` from the sun at (azimuth, elevation) plus an isotropic sky of `diffuseWm2` on every plane. */
export function sunLandscape(sunAzimuthDeg: number, sunElevationDeg: number, beamWm2 = 800, diffuseWm2 = 100) {
  const s = directionFromAzimuthElevation(sunAzimuthDeg, sunElevationDeg);
  return (n: readonly number[]) => beamWm2 * Math.max(0, n[0]! * s[0] + n[1]! * s[1] + n[2]! * s[2]) + diffuseWm2;
}

const bestCache = new WeakMap<object, { tiltDeg: number; azimuthDeg: number; wm2: number }>();

export function modelOf(
  irr: (n: readonly number[]) => number,
  atMs: number,
  opts: { sunElevationDeg?: number; globalMax?: { tiltDeg: number; azimuthDeg: number; wm2: number } } = {},
): SiteModel {
  let best = bestCache.get(irr) ?? { tiltDeg: 0, azimuthDeg: 0, wm2: -1 };
  if (!opts.globalMax && best.wm2 < 0) {
    for (let t = 0; t <= 85; t += 1)
      for (let a = 0; a < 360; a += 2) {
        const e = irr(normalFromTiltAzimuth(t, a));
        if (e > best.wm2) best = { tiltDeg: t, azimuthDeg: a, wm2: e };
      }
    bestCache.set(irr, best);
  }
  return {
    atMs,
    sunElevationDeg: opts.sunElevationDeg ?? 50,
    indoor: false,
    globalMax: opts.globalMax ?? best,
    readings: (tiltDeg, azimuthDeg, d) => detectorReadingsWith(irr as never, tiltDeg, azimuthDeg, d),
  };
}

export const UNIT: UnitRef = { unitId: 1, serial: 'T-0001', siteId: 1, detectorTiltDeg: 20 };
export const peer = (i: number): UnitRef => ({ unitId: 1 + i, serial: `T-000${1 + i}`, siteId: 1, detectorTiltDeg: 20 });

/** A report of a unit at an orientation, readings from the landscape (optionally altered). */
export function report(
  irr: (n: readonly number[]) => number,
  atMs: number,
  o: Partial<Telemetry> & { tiltDeg: number; azimuthDeg: number; detectorTiltDeg?: number; gains?: [number, number, number, number] },
): Telemetry {
  const r = detectorReadingsWith(irr as never, o.tiltDeg, o.azimuthDeg, o.detectorTiltDeg ?? 20);
  const g = o.gains ?? [1, 1, 1, 1];
  const { detectorTiltDeg: _d, gains: _g, ...rest } = o;
  return {
    v: 1,
    seq: 0,
    ts: new Date(atMs).toISOString(),
    tiltPlusWm2: r.tiltPlusWm2 * g[0],
    tiltMinusWm2: r.tiltMinusWm2 * g[1],
    azimuthPlusWm2: r.azimuthPlusWm2 * g[2],
    azimuthMinusWm2: r.azimuthMinusWm2 * g[3],
    poaWm2: r.panelWm2,
    cmdTiltDeg: o.tiltDeg,
    cmdAzimuthDeg: o.azimuthDeg,
    tiltMotorA: 0.05,
    azimuthMotorA: 0.05,
    dcPowerW: (420 * r.panelWm2) / 1000,
    moduleTempC: 25,
    mode: 'settled',
    firmware: '2.4.1',
    ...rest,
  };
}

/** An engine on a clock the test moves, with one model for every site, collecting what it raises and clears. */
export function testEngine(model: (atMs: number) => SiteModel | undefined) {
  let now = T0;
  const raised: Alarm[] = [];
  const cleared: Alarm[] = [];
  const engine = new HealthEngine({
    now: () => now,
    models: { siteModel: (_s, at) => model(at) },
    listeners: { raised: (a) => raised.push(a), cleared: (a) => cleared.push(a) },
  });
  return { engine, raised, cleared, setNow: (ms: number) => void (now = ms), now: () => now };
}

/** Feeds `minutes` of reports every 5 s from `startMs`; `make(atMs)` builds each report (per unit). */
export function feed(
  e: ReturnType<typeof testEngine>,
  startMs: number,
  minutes: number,
  units: { unit: UnitRef; make: (atMs: number, i: number) => Telemetry | null }[],
): number {
  let at = startMs;
  for (let i = 0; i < minutes * 12; i++, at += 5000) {
    e.setNow(at);
    for (const u of units) {
      const t = u.make(at, i);
      if (t) e.engine.telemetry(u.unit, t);
    }
    e.engine.tick();
  }
  return at;
}
