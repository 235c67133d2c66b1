import { TestBed } from '@angular/core/testing';
import type { CommandView, UnitLiveState } from '../../../shared/contracts/live';
import type { HoldView } from '../../../shared/contracts/holds';
import type { UnitConfig } from '../../../shared/contracts/wire';
import { CommandPanel, settingsFromForm } from './command-panel';
import {
  commandChoices,
  CONFIGURE_CAUTION,
  describeCommand,
  describeConfigure,
  describeRelease,
  HOLD_CAUTION,
  MOTION_CAUTION,
  queuedNote,
  RELEASE_CAUTION,
  upsertCommand,
  type CommandChoice,
} from './commands';

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
const reasons = (role: Parameters<typeof commandChoices>[0], s: UnitLiveState | null, meId: number | null = null) =>
  Object.fromEntries(commandChoices(role, s, meId).map((c) => [c.kind, c.disabledReason]));
const hold = (id: number, holderId: number, name: string, over: Partial<HoldView> = {}): HoldView => ({
  id,
  unitId: 1,
  holder: { kind: 'person', id: holderId, name },
  note: null,
  placedAt: '2026-06-21T09:00:00Z',
  placedBy: { id: holderId, name },
  releasedAt: null,
  releasedBy: null,
  releaseReason: null,
  ...over,
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
    for (const k of ['scan', 'goto', 'stow', 'release-stow'])
      expect(engineer[k]).toBe(
        'The unit is on maintenance hold: motion is refused until every hold is released (held by Ines Calder and Kwame Ruiz).',
      );
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
    expect(describeRelease('QHL-2401', a, [a, b], INES)).toBe(
      'Your hold on QHL-2401 ends. QHL-2401 stays held by Kwame Ruiz and does not move until every hold is released.',
    );
    expect(describeRelease('QHL-2401', b, [b], 1)).toBe(
      'The hold of Kwame Ruiz on QHL-2401 ends. It is the last hold: QHL-2401 will resume tracking and may start to move at once.',
    );
    expect(describeConfigure('QHL-2401', { gain: 0.5, detectorTiltDeg: 12 })).toContain('(gain 0.5, detector tilt 12°)');
  });

  it('gives crews hold and release only, and owners nothing', () => {
    const crew = reasons('crew', state());
    expect(crew['hold']).toBeNull();
    expect(crew['scan']).toMatch(/Field crews/);
    expect(Object.values(reasons('owner', state())).every((x) => x !== null)).toBe(true);
  });

  it('names the unit and the motion, and the caution covers the hazards and the rule that software is not lockout', () => {
    expect(describeCommand('QHL-2401', 'goto', { tiltDeg: 35, azimuthDeg: 170 })).toContain(
      'QHL-2401 will turn its panel to tilt 35° and azimuth 170°',
    );
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

  it('says that automatic wind stow can still move a unit that is not on hold, wherever motion can follow', () => {
    for (const text of [MOTION_CAUTION, CONFIGURE_CAUTION])
      expect(text).toMatch(/automatic wind stow can still move any unit that is not on hold/i);
    for (const text of [HOLD_CAUTION, RELEASE_CAUTION]) expect(text).toMatch(/automatic wind stow/);
  });

  it('keeps the history newest first, replacing a command when its status changes', () => {
    const c = (id: string, at: string, status: CommandView['status']): CommandView => ({
      id,
      unitId: 1,
      kind: 'scan',
      params: null,
      status,
      reason: null,
      issuedBy: { id: 1, name: 'A' },
      issuedAt: at,
      sentAt: null,
      ackedAt: null,
      finishedAt: null,
      expiresAt: null,
    });
    let h = upsertCommand([], c('a', '2026-01-01T10:00:00Z', 'queued'));
    h = upsertCommand(h, c('b', '2026-01-01T11:00:00Z', 'sent'));
    h = upsertCommand(h, c('a', '2026-01-01T10:00:00Z', 'completed'));
    expect(h.map((x) => `${x.id}:${x.status}`)).toEqual(['b:sent', 'a:completed']);
  });
});

describe('CommandPanel', () => {
  const choice = (kind: CommandChoice['kind'], disabledReason: string | null = null, motion = true): CommandChoice =>
    ({ kind, label: kind, icon: 'x', motion, disabledReason }) as CommandChoice;

  async function render(choices: CommandChoice[], over: { offline?: boolean; canConfigure?: boolean } = {}) {
    const fixture = TestBed.createComponent(CommandPanel);
    fixture.componentRef.setInput('serial', 'QED-2401');
    fixture.componentRef.setInput('choices', choices);
    fixture.componentRef.setInput('offline', over.offline ?? false);
    fixture.componentRef.setInput('canConfigure', over.canConfigure ?? true);
    const sent: string[] = [];
    const configured: UnitConfig[] = [];
    fixture.componentInstance.send.subscribe((c) => sent.push(c.kind));
    fixture.componentInstance.configure.subscribe((c) => configured.push(c));
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const type = async (name: string, value: string) => {
      const input = el.querySelector<HTMLInputElement>(`input[name="${name}"]`)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    return { fixture, el, sent, configured, type };
  }

  it('offers each command, says why one is not offered, and hands the chosen one to the view', async () => {
    const { el, sent } = await render([choice('stow'), choice('scan', 'The unit is on maintenance hold.')]);
    const scan = el.querySelector<HTMLButtonElement>('[data-testid="cmd-scan"]')!;
    expect(scan.disabled).toBe(true);
    expect(el.querySelector('#why-scan')!.textContent).toBe('The unit is on maintenance hold.');
    expect(el.querySelector('[data-testid="cmd-stow"]')!.parentElement!.textContent).toContain(
      'Moves the unit; you will be asked to confirm.',
    );
    el.querySelector<HTMLButtonElement>('[data-testid="cmd-stow"]')!.click();
    expect(sent).toEqual(['stow']);
  });

  it('says so when the unit is offline, and shows no settings form to those who may not send settings', async () => {
    const { el } = await render([choice('hold', null, false)], { offline: true, canConfigure: false });
    expect(el.querySelector('[data-testid="offline-notice"]')!.textContent).toContain('QED-2401 is offline. Commands wait in the queue');
    expect(el.querySelector('[data-testid="settings-form"]')).toBeNull();
  });

  it('sends only the settings filled in, and refuses one out of range with the ranges in words', async () => {
    const { el, configured, type } = await render([]);
    const submit = () => el.querySelector<HTMLButtonElement>('[data-testid="cmd-configure"]')!;
    expect(submit().disabled).toBe(true);
    await type('gain', '0.5');
    await type('detectorTiltDeg', '60');
    expect(submit().disabled).toBe(true);
    expect(el.querySelector('#why-configure')!.textContent).toBe(
      'Detector tilt 0.5–45°, gain 0.001–100, deadband 0–500 W/m², report interval 1–3600 s.',
    );
    await type('detectorTiltDeg', '12');
    expect(submit().disabled).toBe(false);
    submit().click();
    expect(configured).toEqual([{ gain: 0.5, detectorTiltDeg: 12 }]);
  });

  it('reads empty and half-typed fields as unchanged, and every range end as allowed', () => {
    expect(settingsFromForm({ detectorTiltDeg: null, gain: null, deadbandWm2: null, reportIntervalS: null })).toBeNull();
    expect(settingsFromForm({ detectorTiltDeg: '' as unknown as number, gain: 100, deadbandWm2: 0, reportIntervalS: 3600 })).toEqual({
      gain: 100,
      deadbandWm2: 0,
      reportIntervalS: 3600,
    });
    expect(settingsFromForm({ detectorTiltDeg: 0.5, gain: 0.001, deadbandWm2: 500, reportIntervalS: 1 })).toEqual({
      detectorTiltDeg: 0.5,
      gain: 0.001,
      deadbandWm2: 500,
      reportIntervalS: 1,
    });
    expect(settingsFromForm({ detectorTiltDeg: null, gain: null, deadbandWm2: null, reportIntervalS: 0.5 })).toBeNull();
    expect(settingsFromForm({ detectorTiltDeg: null, gain: Number.NaN, deadbandWm2: null, reportIntervalS: null })).toBeNull();
  });
});
