import type { CommandView, UnitLiveState } from '../../../shared/contracts/live';
import type { HoldView } from '../../../shared/contracts/holds';
import { toAlarmView } from '../live/alarm-api';
import { shortfallPercent, siteTime, statusLook, utcTime } from '../live/unit-status';
import {
  commandChoices, CONFIGURE_CAUTION, describeCommand, describeConfigure, describeRelease, HOLD_CAUTION, MOTION_CAUTION, queuedNote, RELEASE_CAUTION, upsertCommand,
} from './commands';
import { appendLive } from './last-hour';
import { domeRadius, horizonLine, normalToDome } from './sky-dome';

const state = (over: Partial<UnitLiveState> = {}): UnitLiveState => ({
  unitId: 1, serial: 'QHL-2401', siteId: 1, online: true, lastReportAt: '2026-06-21T10:00:00Z', mode: 'settled', poaWm2: 800, dcPowerW: 300,
  tiltDeg: 30, azimuthDeg: 180, cmdTiltDeg: 30, cmdAzimuthDeg: 180, tiltDiffWm2: 0, azimuthDiffWm2: 0, moduleTempC: 30, onHold: false, holds: [], ...over,
});
const reasons = (role: Parameters<typeof commandChoices>[0], s: UnitLiveState | null, meId: number | null = null) =>
  Object.fromEntries(commandChoices(role, s, meId).map((c) => [c.kind, c.disabledReason]));
const hold = (id: number, holderId: number, name: string, over: Partial<HoldView> = {}): HoldView => ({
  id, unitId: 1, holder: { kind: 'person', id: holderId, name }, note: null, placedAt: '2026-06-21T09:00:00Z', placedBy: { id: holderId, name },
  releasedAt: null, releasedBy: null, releaseReason: null, ...over,
});
const INES = 5;
const KWAME = 6;
const heldBy = (...holds: HoldView[]) => state({ onHold: true, mode: 'held', holds });

describe('command panel', () => {
  it('lets a technician move a unit that is not held', () => {
    const r = reasons('technician', state());
    expect(r['scan']).toBeNull();
    expect(r['goto']).toBeNull();
    expect(r['stow']).toBeNull();
    expect(r['hold']).toBeNull();
    expect(r['release-hold']).toMatch(/not on hold/);
    expect(r['release-stow']).toMatch(/not stowed/);
  });

  it('disables every motion on a held unit naming the holders; the holder may release, and someone else may add a hold', () => {
    const s = heldBy(hold(1, INES, 'Ines Calder'), hold(2, KWAME, 'Kwame Ruiz'));
    const ines = reasons('crew', s, INES);
    expect(ines['release-hold']).toBeNull();
    expect(ines['hold']).toMatch(/You hold this unit already/);
    const engineer = reasons('engineer', s, 9);
    for (const k of ['scan', 'goto', 'stow', 'release-stow']) expect(engineer[k]).toBe('The unit is on maintenance hold: motion is refused until every hold is released (held by Ines Calder and Kwame Ruiz).');
    expect(engineer['hold']).toBeNull();
    expect(engineer['release-hold']).toMatch(/no hold on this unit.*or by an admin giving a reason/);
    expect(reasons('admin', s, 1)['release-hold']).toMatch(/release others from the hold list/);
  });

  it('treats a unit that reports it is held as held even with no hold in force here', () => {
    const r = reasons('technician', state({ mode: 'held' }), 3);
    expect(r['stow']).toMatch(/until the unit reports that its own hold is released/);
    expect(r['release-hold']).toMatch(/released on the unit/);
  });

  it('says what a queued command waits for: motion expires at a site time, a hold is in force already', () => {
    const expiring = queuedNote({ kind: 'stow', status: 'queued', expiresAt: '2026-06-21T12:32:00Z' }, 'Europe/Berlin');
    expect(expiring).toMatch(/^Queued: the unit is offline\. It expires at 14:32:00 (CEST|GMT\+2) if the unit does not reconnect\.$/);
    expect(queuedNote({ kind: 'hold', status: 'queued', expiresAt: null }, 'UTC')).toMatch(/in force already/);
    expect(queuedNote({ kind: 'stow', status: 'sent', expiresAt: null }, 'UTC')).toBeNull();
  });

  it('tells a releaser whether the unit stays held or may move at once', () => {
    const a = hold(1, INES, 'Ines Calder');
    const b = hold(2, KWAME, 'Kwame Ruiz');
    expect(describeRelease('QHL-2401', a, [a, b], INES)).toBe('Your hold on QHL-2401 ends. QHL-2401 stays held by Kwame Ruiz and does not move until every hold is released.');
    expect(describeRelease('QHL-2401', b, [b], 1)).toBe('The hold of Kwame Ruiz on QHL-2401 ends. It is the last hold: QHL-2401 will resume tracking and may start to move at once.');
    expect(describeConfigure('QHL-2401', { gain: 0.5, detectorTiltDeg: 12 })).toContain('(gain 0.5, detector tilt 12°)');
  });

  it('gives crews hold and release only, and owners nothing', () => {
    const crew = reasons('crew', state());
    expect(crew['hold']).toBeNull();
    expect(crew['scan']).toMatch(/Field crews/);
    expect(Object.values(reasons('owner', state())).every((x) => x !== null)).toBe(true);
  });

  it('names the unit and the motion, and the caution covers the hazards and the rule that software is not lockout', () => {
    expect(describeCommand('QHL-2401', 'goto', { tiltDeg: 35, azimuthDeg: 170 })).toContain('QHL-2401 will turn its panel to tilt 35° and azimuth 170°');
    expect(describeCommand('QHL-2401', 'stow')).toContain('QHL-2401');
    for (const words of [/pinch/, /stored mechanical energy/, /DC voltage/, /wind/, /not a lockout/, /Local codes and licensed practice/]) {
      expect(MOTION_CAUTION).toMatch(words);
    }
  });

  it('cautions on hold, release and settings: a software lock is not a lockout, release may move the unit, the site procedure governs', () => {
    for (const text of [HOLD_CAUTION, RELEASE_CAUTION, CONFIGURE_CAUTION]) {
      expect(text).toMatch(/not a lockout/);
      expect(text).toMatch(/Local codes and licensed practice govern all work on site/);
    }
    expect(RELEASE_CAUTION).toMatch(/move at once/);
    expect(RELEASE_CAUTION).toMatch(/lockout\/tagout procedure/);
    expect(CONFIGURE_CAUTION).toMatch(/nobody is within reach/);
  });

  it('keeps the history newest first, replacing a command when its status changes', () => {
    const c = (id: string, at: string, status: CommandView['status']): CommandView =>
      ({ id, unitId: 1, kind: 'scan', params: null, status, reason: null, issuedBy: { id: 1, name: 'A' }, issuedAt: at, sentAt: null, ackedAt: null, finishedAt: null, expiresAt: null });
    let h = upsertCommand([], c('a', '2026-01-01T10:00:00Z', 'queued'));
    h = upsertCommand(h, c('b', '2026-01-01T11:00:00Z', 'sent'));
    h = upsertCommand(h, c('a', '2026-01-01T10:00:00Z', 'completed'));
    expect(h.map((x) => `${x.id}:${x.status}`)).toEqual(['b:sent', 'a:completed']);
  });
});

describe('unit view values', () => {
  it('shows state by word and icon; offline and hold win over the reported mode', () => {
    expect(statusLook(state())).toMatchObject({ label: 'Settled', icon: 'check_circle' });
    expect(statusLook(state({ online: false }))).toMatchObject({ label: 'Offline', icon: 'cloud_off' });
    expect(statusLook(state({ onHold: true, mode: 'seeking' }))).toMatchObject({ label: 'Maintenance hold' });
    expect(statusLook(null).label).toBe('No reports yet');
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

  it('puts the panel normal on the sky dome (tilt 30° looks at elevation 60°) with the zenith in the centre', () => {
    expect(normalToDome(30, 190)).toEqual({ azimuthDeg: 190, elevationDeg: 60 });
    expect(normalToDome(0, -10).azimuthDeg).toBe(350);
    expect(domeRadius(90)).toBe(0);
    expect(domeRadius(0)).toBe(90);
    expect(domeRadius(-5)).toBe(90);
    const h = horizonLine([[0, 10], [90, 30]]);
    expect(h.find(([az]) => az === 44)![1]).toBeCloseTo(19.78, 1);
    expect(h.find(([az]) => az === 226)![1]).toBeCloseTo(20, 0);
  });

  it('takes alarms from live messages and leaves wind-stow events out', () => {
    const alarm = { id: 5, kind: 'trap', severity: 'P2', state: 'active', unitId: 3, serial: 'S', siteId: 1, message: 'x', advice: '', evidence: {},
      firstSeenAt: '2026-01-01T00:00:00Z', raisedAt: '2026-01-01T00:10:00Z', lastSeenAt: '2026-01-01T00:20:00Z', clearedAt: null, clearReason: null, acknowledgedAt: null, acknowledgedBy: null };
    expect(toAlarmView(alarm)).toBe(alarm);
    expect(toAlarmView({ kind: 'wind-stow', severity: 'P4', state: 'event', serial: 'S', siteId: 1, at: '2026-01-01T00:00:00Z', event: 'stowed', message: 'm' })).toBeNull();
    expect(toAlarmView(null)).toBeNull();
  });
});
