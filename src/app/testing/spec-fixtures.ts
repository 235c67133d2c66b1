/** Fixtures shared by the dashboard's specs (never imported by the app). */
import type { AlarmView, ScanResult } from '../../../shared/contracts/alarms';

/** A live socket the specs drive by hand: `FakeSocket.last.push(message)` delivers a server message. */
export class FakeSocket {
  static last: FakeSocket | null = null;
  readyState = 0;
  onopen: (() => void) | null = null;
  onmessage: ((e: { data: string }) => void) | null = null;
  onclose: (() => void) | null = null;
  constructor() {
    FakeSocket.last = this;
  }
  send(): void {}
  close(): void {}
  push(msg: unknown): void {
    this.onmessage?.({ data: JSON.stringify(msg) });
  }
}

/** An active P3 stall alarm of QHL-2401 at Harbour Roof; `over` changes any field. */
export const alarmView = (over: Partial<AlarmView> = {}): AlarmView => ({
  id: 1,
  kind: 'stall',
  severity: 'P3',
  state: 'active',
  unitId: 3,
  serial: 'QHL-2401',
  siteId: 1,
  siteName: 'Harbour Roof',
  message: 'Tilt drive stalled.',
  advice: 'Check the drive.',
  evidence: {},
  firstSeenAt: '2026-06-21T09:00:00Z',
  raisedAt: '2026-06-21T09:10:00Z',
  lastSeenAt: '2026-06-21T10:00:00Z',
  clearedAt: null,
  clearReason: null,
  acknowledgedAt: null,
  acknowledgedBy: null,
  ...over,
});

/** A completed 3 × 3 scan whose measured best beats where the unit was by 68 %; `over` changes any field. */
export const scanResult = (over: Partial<ScanResult> = {}): ScanResult => ({
  commandId: 'c1',
  startedAt: '2026-06-21T10:00:00Z',
  completedAt: '2026-06-21T10:04:00Z',
  complete: true,
  landscape: {
    tiltsDeg: [0, 30, 60],
    azimuthsDeg: [90, 180, 270],
    values: [
      [300, 320, null],
      [400, 850, 500],
      [200, 610, 180],
    ],
    samples: 8,
    sampleMax: { tiltDeg: 30, azimuthDeg: 180, wm2: 850 },
    globalMax: { tiltDeg: 31.2, azimuthDeg: 178.4, wm2: 861.3 },
    localMaxima: [
      { tiltDeg: 30, azimuthDeg: 180, wm2: 850 },
      { tiltDeg: 60, azimuthDeg: 180, wm2: 610 },
    ],
  },
  beforeWm2: 512,
  expectedGainWm2: 349.3,
  expectedGainPct: 68.2,
  model: { globalMax: { tiltDeg: 28, azimuthDeg: 182, wm2: 880 }, angleApartDeg: 3.46, measuredVsModelPct: 97.9 },
  goto: { kind: 'goto', tiltDeg: 31.2, azimuthDeg: 178.4 },
  ...over,
});
