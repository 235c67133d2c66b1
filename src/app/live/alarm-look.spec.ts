import type { AlarmView } from '../../../shared/contracts/alarms';
import {
  alarmKindLabel,
  evidenceSummary,
  filterAlarms,
  severityLook,
  sortAlarms,
  traceQuery,
  trapFinding,
  upsertAlarm,
  worstOpen,
} from './alarm-look';

const makeAlarm = (over: Partial<AlarmView> = {}): AlarmView => ({
  id: 1,
  kind: 'stall',
  severity: 'P3',
  state: 'active',
  unitId: 7,
  serial: 'QHL-2407',
  siteId: 1,
  siteName: 'Harbour Roof',
  message: 'm',
  advice: 'a',
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

const trapEvidence = {
  readings: { poaWm2: 512.4, tiltDeg: 41.2, azimuthDeg: 250.5 },
  model: {
    globalMax: { tiltDeg: 30, azimuthDeg: 180, wm2: 880 },
    modelledHereWm2: 520,
    localMaxima: [{}, {}, {}],
    minSinglePeakDetectorTiltDeg: 14,
  },
  lossWm2: 367.6,
  lossPct: 41.8,
  detectorTiltDeg: 6,
};

describe('alarm severity and kind', () => {
  it('shows every severity by code, word and icon, distinct for each (not by colour alone)', () => {
    const looks = ['P1', 'P2', 'P3', 'P4'].map(severityLook);
    expect(looks.map((l) => `${l.code} ${l.label}`)).toEqual(['P1 Urgent', 'P2 High', 'P3 Medium', 'P4 Low']);
    expect(new Set(looks.map((l) => l.icon)).size).toBe(4);
    expect(severityLook('P9')).toMatchObject({ label: 'Unknown', rank: 4 });
  });

  it('names kinds plainly and shows unknown kinds as sent', () => {
    expect(alarmKindLabel('trap')).toBe('Stuck on a lesser peak');
    expect(alarmKindLabel('belt-slip')).toBe('belt slip');
  });
});

describe('alarm order and filters', () => {
  const list = [
    makeAlarm({ id: 1, severity: 'P3', firstSeenAt: '2026-06-21T08:00:00Z' }),
    makeAlarm({ id: 2, severity: 'P2', kind: 'trap', evidence: { lossWm2: 100 } }),
    makeAlarm({ id: 3, severity: 'P2', kind: 'trap', evidence: { lossWm2: 300 } }),
    makeAlarm({ id: 4, severity: 'P1', state: 'cleared', clearedAt: '2026-06-21T10:30:00Z' }),
    makeAlarm({ id: 5, severity: 'P3', firstSeenAt: '2026-06-21T07:00:00Z', siteId: 2, acknowledgedAt: '2026-06-21T10:00:00Z' }),
    makeAlarm({ id: 6, severity: 'P1', kind: 'not-stowed' }),
  ];

  it('puts open before cleared, then P1 first, then most irradiance lost, then longest open', () => {
    expect(sortAlarms(list).map((a) => a.id)).toEqual([6, 3, 2, 5, 1, 4]);
    expect(worstOpen(list)!.id).toBe(6);
  });

  it('filters by site, kind and state (open, not acknowledged, cleared, all)', () => {
    const ids = (f: Parameters<typeof filterAlarms>[1]) =>
      filterAlarms(list, f)
        .map((a) => a.id)
        .sort();
    expect(ids({ siteId: null, kind: null, state: 'open' })).toEqual([1, 2, 3, 5, 6]);
    expect(ids({ siteId: null, kind: null, state: 'unacknowledged' })).toEqual([1, 2, 3, 6]);
    expect(ids({ siteId: null, kind: null, state: 'cleared' })).toEqual([4]);
    expect(ids({ siteId: 2, kind: null, state: 'all' })).toEqual([5]);
    expect(ids({ siteId: null, kind: 'trap', state: 'open' })).toEqual([2, 3]);
  });

  it('replaces an alarm by id on a live update (raise, clear, acknowledge)', () => {
    const next = upsertAlarm(list, makeAlarm({ id: 2, state: 'cleared' }));
    expect(next).toHaveLength(6);
    expect(next.find((a) => a.id === 2)!.state).toBe('cleared');
    expect(upsertAlarm(list, makeAlarm({ id: 9 }))).toHaveLength(7);
  });
});

describe('alarm evidence', () => {
  it('reads a trap: where the modelled best is, what is lost, how many peaks and the single-peak detector tilt', () => {
    const a = makeAlarm({ kind: 'trap', evidence: trapEvidence });
    expect(trapFinding(a)).toEqual({
      best: { tiltDeg: 30, azimuthDeg: 180, wm2: 880 },
      modelledHereWm2: 520,
      lossWm2: 367.6,
      lossPct: 41.8,
      peaks: 3,
      singlePeakDetectorTiltDeg: 14,
      detectorTiltDeg: 6,
    });
    const facts = Object.fromEntries(evidenceSummary(a).map((f) => [f.label, f.value]));
    expect(facts).toMatchObject({
      Pointing: 'tilt 41.2°, azimuth 250.5°',
      'In-plane': '512 W/m²',
      'Modelled brightest': '880 W/m² at tilt 30°, azimuth 180°',
      Lost: '368 W/m² (41.8 %)',
      'Peaks in the model': '3',
    });
  });

  it('gives no trap finding for other kinds or a trap without a model, and summarises other evidence it knows', () => {
    expect(trapFinding(makeAlarm({ kind: 'stall', evidence: trapEvidence }))).toBeNull();
    expect(trapFinding(makeAlarm({ kind: 'trap', evidence: {} }))).toBeNull();
    const facts = evidenceSummary(makeAlarm({ kind: 'stall', evidence: { axes: ['tilt'], readings: { poaWm2: 10 } } }));
    expect(facts).toEqual([
      { label: 'In-plane', value: '10 W/m²' },
      { label: 'Stalled axes', value: 'tilt' },
    ]);
    expect(evidenceSummary(makeAlarm({ kind: 'site-comms', evidence: { silentUnits: [{}, {}], units: 3 } }))).toEqual([
      { label: 'Silent units', value: '2 of 3' },
    ]);
  });

  it('opens traces 30 min around the alarm, up to now while it is open; none for a site alarm', () => {
    const now = Date.parse('2026-06-21T10:05:00Z');
    expect(traceQuery(makeAlarm(), now)).toEqual({ units: 7, from: '2026-06-21T08:30:00.000Z', to: '2026-06-21T10:05:00.000Z' });
    expect(traceQuery(makeAlarm({ state: 'cleared', clearedAt: '2026-06-21T09:20:00Z' }), now)!.to).toBe('2026-06-21T09:50:00.000Z');
    expect(traceQuery(makeAlarm({ unitId: null }), now)).toBeNull();
  });
});
