import type { Site, Unit } from '../../../shared/contracts/api';
import type { UnitLiveState } from '../../../shared/contracts/live';
import type { AlarmView } from '../core/alarm-api';
import { filterRows, fleetRows, mergeStates, sortRows, toneCounts } from './fleet-rows';

const site = (id: number, name: string): Site => ({
  id,
  name,
  ownerId: 1,
  ownerName: 'O',
  latitudeDeg: 0,
  longitudeDeg: 0,
  elevationM: 0,
  timeZone: 'Europe/Berlin',
  albedo: 0.2,
  indoor: false,
  unitCount: 0,
});
const unit = (id: number, serial: string, siteId: number): Unit => ({
  id,
  serial,
  siteId,
  siteName: '',
  ratedPowerWp: 420,
  detectorTiltDeg: 20,
  tiltMinDeg: 0,
  tiltMaxDeg: 85,
  azimuthMinDeg: 0,
  azimuthMaxDeg: 360,
  planXM: 0,
  planYM: 0,
  firmware: '1',
  disabled: false,
  weatherStation: false,
});
const live = (unitId: number, over: Partial<UnitLiveState> = {}): UnitLiveState => ({
  unitId,
  serial: '',
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
const alarm = (unitId: number, severity: string, state = 'active'): AlarmView => ({
  id: unitId * 10 + Number(severity.slice(1)),
  unitId,
  siteId: 1,
  serial: null,
  kind: 'trap',
  severity,
  state,
  message: 'm',
  advice: '',
  evidence: {},
  firstSeenAt: '2026-06-21T09:00:00Z',
  raisedAt: '2026-06-21T09:10:00Z',
  lastSeenAt: '2026-06-21T10:00:00Z',
  clearedAt: null,
  clearReason: null,
  acknowledgedAt: null,
  acknowledgedBy: null,
});

const sites = new Map([
  [1, site(1, 'Harbour Roof')],
  [2, site(2, 'Depot Yard')],
]);
const units = [unit(1, 'A-1', 1), unit(2, 'A-2', 1), unit(3, 'B-1', 2), unit(4, 'B-2', 2)];
const states = new Map([
  [1, live(1, { poaWm2: 500, dcPowerW: 100 })],
  [2, live(2, { online: false })],
  [3, live(3, { mode: 'seeking', dcPowerW: 350, onHold: true })],
]);
const bests = new Map([
  [1, 1000],
  [2, 900],
]);

describe('fleet board rows', () => {
  const rows = fleetRows(units, sites, states, bests, [alarm(1, 'P3'), alarm(1, 'P2'), alarm(3, 'P1', 'cleared')]);

  it('joins site, state, shortfall against the modelled best and active alarms, worst first', () => {
    const a1 = rows.find((r) => r.unit.serial === 'A-1')!;
    expect(a1.site?.name).toBe('Harbour Roof');
    expect(a1.look.label).toBe('Settled');
    expect(a1.shortfall).toBe(50);
    expect(a1.alarms.map((a) => a.severity)).toEqual(['P2', 'P3']);
    expect(a1.worstSeverity).toBe('P2');
    // Offline: shown as such, no shortfall; hold beats the reported mode; cleared alarms are not badges.
    const a2 = rows.find((r) => r.unit.serial === 'A-2')!;
    expect(a2.look.label).toBe('Offline');
    expect(a2.shortfall).toBeNull();
    const b1 = rows.find((r) => r.unit.serial === 'B-1')!;
    expect(b1.look.label).toBe('Maintenance hold');
    expect(b1.alarms).toEqual([]);
    expect(rows.find((r) => r.unit.serial === 'B-2')!.look.label).toBe('Never reported');
  });

  it('claims no shortfall indoors, where the building switches the lamps', () => {
    const indoor = new Map([
      [1, { ...site(1, 'Atrium'), indoor: true }],
      [2, site(2, 'Depot Yard')],
    ]);
    const r = fleetRows(units, indoor, states, bests, []);
    expect(r.find((x) => x.unit.serial === 'A-1')!.shortfall).toBeNull();
    expect(fleetRows(units, sites, states, bests, []).find((x) => x.unit.serial === 'A-1')!.shortfall).toBe(50);
  });

  it('filters by text (serial or site), site and state or alarms', () => {
    expect(filterRows(rows, { text: 'depot', siteId: null, tone: null }).map((r) => r.unit.serial)).toEqual(['B-1', 'B-2']);
    expect(filterRows(rows, { text: 'a-', siteId: null, tone: null }).map((r) => r.unit.serial)).toEqual(['A-1', 'A-2']);
    expect(filterRows(rows, { text: '', siteId: 2, tone: 'caution' }).map((r) => r.unit.serial)).toEqual(['B-1']);
    expect(filterRows(rows, { text: '', siteId: null, tone: 'alarm' }).map((r) => r.unit.serial)).toEqual(['A-1']);
    expect(filterRows(rows, { text: 'nothing', siteId: null, tone: null })).toEqual([]);
  });

  it('sorts by state urgency, by numbers with missing values last in both directions, and by alarms', () => {
    expect(sortRows(rows, 'state', 'asc').map((r) => r.unit.serial)).toEqual(['A-2', 'B-1', 'B-2', 'A-1']);
    expect(sortRows(rows, 'power', 'desc').map((r) => r.unit.serial)).toEqual(['B-1', 'A-2', 'A-1', 'B-2']);
    expect(sortRows(rows, 'power', 'asc').map((r) => r.unit.serial)).toEqual(['A-1', 'A-2', 'B-1', 'B-2']);
    expect(sortRows(rows, 'alarms', 'desc')[0]!.unit.serial).toBe('A-1');
  });

  it('sorts by most urgent open alarm, P1 first, units without alarms last in both directions', () => {
    const r = fleetRows(units, sites, states, bests, [alarm(1, 'P3'), alarm(2, 'P1'), alarm(4, 'P4'), alarm(3, 'P1', 'cleared')]);
    expect(sortRows(r, 'alarms', 'asc').map((x) => `${x.unit.serial}:${x.worstSeverity}`)).toEqual([
      'A-2:P1',
      'A-1:P3',
      'B-2:P4',
      'B-1:null',
    ]);
    expect(sortRows(r, 'alarms', 'desc').map((x) => x.unit.serial)).toEqual(['B-2', 'A-1', 'A-2', 'B-1']);
  });

  it('counts units per state for the summary and applies live updates without losing others', () => {
    expect(toneCounts(rows)).toEqual({ good: 1, busy: 0, caution: 1, problem: 1, stopped: 1, alarm: 1 });
    const next = mergeStates(states, [live(4, { mode: 'scanning' })]);
    expect(next.size).toBe(4);
    expect(next.get(4)!.mode).toBe('scanning');
    expect(states.size).toBe(3);
    expect(mergeStates(states, [live(4)], true).size).toBe(1);
  });
});
