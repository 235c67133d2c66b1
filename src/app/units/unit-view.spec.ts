import type { UnitLiveState } from '../../../shared/contracts/live';
import { shortfallPercent, siteTime, statusLook, utcTime } from '../live/unit-status';
import { appendLive } from './last-hour';

const state = (over: Partial<UnitLiveState> = {}): UnitLiveState => ({
  unitId: 1,
  serial: 'QHL-2401',
  siteId: 1,
  online: true,
  lastReportAt: '2026-06-21T10:00:00Z',
  mode: 'settled',
  poaWm2: 800,
  dcPowerW: 300,
  tiltDeg: 30,
  azimuthDeg: 180,
  cmdTiltDeg: 30,
  cmdAzimuthDeg: 180,
  tiltDiffWm2: 0,
  azimuthDiffWm2: 0,
  moduleTempC: 30,
  onHold: false,
  holds: [],
  ...over,
});

describe('unit view values', () => {
  it('shows state by word and icon; offline and hold win over the reported mode', () => {
    expect(statusLook(state())).toMatchObject({ label: 'Settled', icon: 'check_circle' });
    expect(statusLook(state({ online: false }))).toMatchObject({ label: 'Offline', icon: 'cloud_off' });
    expect(statusLook(state({ onHold: true, mode: 'seeking' }))).toMatchObject({ label: 'Maintenance hold' });
    expect(statusLook(null).label).toBe('Never reported');
  });

  it('compares with the modelled best only in daylight', () => {
    expect(shortfallPercent(800, 1000)).toBe(20);
    expect(shortfallPercent(1100, 1000)).toBe(0);
    expect(shortfallPercent(5, 20)).toBeNull();
    expect(shortfallPercent(null, 1000)).toBeNull();
  });

  it('writes times in the site zone with the UTC instant for tooltips', () => {
    expect(siteTime('2026-06-21T12:00:05Z', 'Europe/Berlin')).toMatch(/^14:00:05 (CEST|GMT\+2)$/);
    expect(siteTime('2026-12-21T12:00:05Z', 'Europe/London', true)).toMatch(/21 Dec 2026.*12:00:05/);
    expect(utcTime('2026-06-21T12:00:05.123Z')).toBe('2026-06-21 12:00:05 UTC');
  });

  it('adds each newer live report to the last hour and drops older points', () => {
    const t0 = Date.parse('2026-06-21T10:00:00Z');
    const pts = [{ t: t0 - 3_700_000, poa: 1, power: 1, tilt: 1, cmdTilt: 1, azimuth: 1, cmdAzimuth: 1 }];
    const next = appendLive(pts, state({ lastReportAt: new Date(t0).toISOString(), poaWm2: 812 }));
    expect(next.map((p) => p.poa)).toEqual([812]);
    expect(appendLive(next, state({ lastReportAt: new Date(t0).toISOString() }))).toHaveLength(1);
  });
});
