import { describe, expect, it } from 'vitest';
import { latestTrapReadings, trapUnderModel } from '../../server/health/trap-reassess';
import { DEFAULT_HEALTH_SETTINGS } from '../../server/health/health-settings';
import type { Alarm } from '../../server/health/alarm-types';
import { scanEpoch, scanSpan } from '../../server/health/scan-epochs';
import { modelOf, sunLandscape, T0 } from './synthetic';

const readings = (poaWm2: number, ts = new Date(T0).toISOString()) => ({ ts, poaWm2, tiltDeg: 40, azimuthDeg: 100, mode: 'settled' });
const alarm = (evidence: Record<string, unknown>): Alarm => ({
  key: 'unit:1/trap@0',
  kind: 'trap',
  unitId: 1,
  serial: 'T-0001',
  siteId: 1,
  severity: 'P3',
  message: '',
  advice: '',
  evidence,
  state: 'active',
  firstSeenMs: T0,
  raisedMs: T0,
  lastSeenMs: T0,
  clearedMs: null,
  clearReason: null,
});

describe('an open trap judged again against a new model', () => {
  const model = modelOf(sunLandscape(180, 50), T0, { globalMax: { tiltDeg: 40, azimuthDeg: 180, wm2: 800 } });

  it('takes the latest readings the alarm carries, else those of its raise, and none when they are missing', () => {
    expect(latestTrapReadings(alarm({ readings: readings(300), latest: { readings: readings(500) } }))!.poaWm2).toBe(500);
    expect(latestTrapReadings(alarm({ readings: readings(300) }))!.poaWm2).toBe(300);
    expect(latestTrapReadings(alarm({}))).toBeNull();
    expect(latestTrapReadings(alarm({ readings: { ...readings(300), poaWm2: 'x' } }))).toBeNull();
  });

  it('holds below trapRatio of the new best and not at or above it; a best too dim to judge holds no trap', () => {
    const r = DEFAULT_HEALTH_SETTINGS.trapRatio;
    expect(trapUnderModel(readings(800 * r - 1), model, DEFAULT_HEALTH_SETTINGS)).toMatchObject({ holds: true, bestWm2: 800 });
    expect(trapUnderModel(readings(800 * r), model, DEFAULT_HEALTH_SETTINGS).holds).toBe(false);
    const dim = modelOf(sunLandscape(180, 50), T0, {
      globalMax: { tiltDeg: 40, azimuthDeg: 180, wm2: DEFAULT_HEALTH_SETTINGS.trapMinBestWm2 - 1 },
    });
    expect(trapUnderModel(readings(10), dim, DEFAULT_HEALTH_SETTINGS).holds).toBe(false);
  });
});

describe('a scan as the survey fit sees it', () => {
  const rows = [10, 30, 50, 70].map((t, i) => ({
    ts: T0 + (i + 1) * 120_000,
    samples: [[t, 0, 100 + i] as [number, number, number], [t, 180, 200 + i] as [number, number, number]],
  }));

  it('starts one row before its first report and is modelled at its middle, with every sample', () => {
    const s = scanSpan([...rows].reverse());
    expect(s.fromMs).toBe(T0);
    expect(s.toMs).toBe(T0 + 480_000);
    expect(s.atMs).toBe(T0 + 240_000);
    expect(s.samples).toHaveLength(8);
    expect(() => scanSpan([])).toThrow(/at least one row/);
  });

  it('adds the other units’ settled readings and the measured brightest orientation', () => {
    const e = scanEpoch(scanSpan(rows), { ghiWm2: 500, dhiWm2: 100 }, [{ tiltDeg: 20, azimuthDeg: 90, poaWm2: 321 }]);
    expect(e.samples).toHaveLength(9);
    expect(e.samples[8]).toEqual({ tiltDeg: 20, azimuthDeg: 90, poaWm2: 321 });
    expect(e.measuredMax).toEqual({ tiltDeg: 70, azimuthDeg: 180 });
    expect(e.weather).toEqual({ ghiWm2: 500, dhiWm2: 100 });
  });
});
