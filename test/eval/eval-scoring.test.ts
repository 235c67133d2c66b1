import { describe, expect, it } from 'vitest';
import { score, type UnitObservability } from './run-eval';
import type { Alarm } from '../../server/health/alarm-types';

const T0 = Date.parse('2026-05-04T08:00:00Z');
const MIN = 60_000;
const iso = (ms: number) => new Date(ms).toISOString().replace('.000Z', 'Z');
const minutes = (fromMin: number, toMin: number) =>
  new Set(Array.from({ length: toMin - fromMin }, (_, i) => Math.floor(T0 / MIN) + fromMin + i));
const base = {
  injectedKeys: new Set<string>(),
  serialOf: new Map([[1, 'U1']]),
  refs: [{ unitId: 1, serial: 'U1', siteId: 1, detectorTiltDeg: 20 }],
  startMs: T0 - 60 * MIN,
  endMs: T0 + 600 * MIN,
  graceMin: 30,
  units: 1,
  hours: 11,
};

describe('evaluation scoring: observability of a fault', () => {
  it('counts a hunting record for recall only when the unit was seen moving in daylight for the minimum time', () => {
    const truth = [{ serial: 'U1', fault: 'hunting' as const, start: iso(T0), end: iso(T0 + 120 * MIN) }];
    const pinned: UnitObservability = { movingInDaylight: minutes(0, 5), tiltDriven: new Set(), azimuthDriven: new Set() };
    const moving: UnitObservability = { movingInDaylight: minutes(0, 60), tiltDriven: new Set(), azimuthDriven: new Set() };
    expect(score({ ...base, alarms: [], truth, seen: new Map([['U1', pinned]]) }).detectors.hunting.eligible).toBe(0);
    const r = score({ ...base, alarms: [], truth, seen: new Map([['U1', moving]]) });
    expect(r.detectors.hunting.eligible).toBe(1);
    expect(r.detectors.hunting.recall).toBe(0);
  });

  it('counts a stall record only when its axis was commanded to move, and scores a matching alarm', () => {
    const truth = [{ serial: 'U1', fault: 'stall' as const, start: iso(T0), end: iso(T0 + 60 * MIN) }];
    const stallAxis = new Map([[`U1|${iso(T0)}`, 'azimuth' as const]]);
    const tiltOnly: UnitObservability = { movingInDaylight: new Set(), tiltDriven: minutes(0, 30), azimuthDriven: new Set() };
    expect(score({ ...base, alarms: [], truth, seen: new Map([['U1', tiltOnly]]), stallAxis }).detectors.stall.eligible).toBe(0);
    const driven: UnitObservability = { ...tiltOnly, azimuthDriven: minutes(10, 12) };
    const alarm = {
      kind: 'stall',
      serial: 'U1',
      unitId: 1,
      siteId: 1,
      raisedMs: T0 + 12 * MIN,
      firstSeenMs: T0 + 11 * MIN,
      clearedMs: null,
    } as unknown as Alarm;
    const r = score({ ...base, alarms: [alarm], truth, seen: new Map([['U1', driven]]), stallAxis });
    expect(r.detectors.stall).toMatchObject({ eligible: 1, recall: 1, precision: 1, medianDelayMin: 12 });
  });

  it('finds a comms loss by the site alarm when the whole site went dark (the units’ own alarms are suppressed then)', () => {
    const truth = [{ serial: 'U1', fault: 'comms-loss' as const, start: iso(T0), end: iso(T0 + 40 * MIN) }];
    const site = {
      kind: 'site-comms',
      serial: null,
      unitId: null,
      siteId: 1,
      raisedMs: T0 + 6 * MIN,
      firstSeenMs: T0 + MIN,
      clearedMs: T0 + 41 * MIN,
    };
    const r = score({ ...base, alarms: [site as unknown as Alarm], truth });
    expect(r.detectors.comms).toMatchObject({ eligible: 1, found: 1, recall: 1, alarms: 0 });
    expect(r.falseAlarms).toBe(0);
  });
});
