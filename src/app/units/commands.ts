import type { Role } from '../../../shared/contracts/api';
import type { CommandStatus, CommandView, UnitLiveState } from '../../../shared/contracts/live';
import type { CommandKind } from '../../../shared/contracts/wire';

/** What the command panel offers. `goto` carries its target. */
export interface CommandChoice {
  kind: Exclude<CommandKind, 'configure'>;
  label: string;
  icon: string;
  /** Whether the structure moves (needs the people-clear confirmation; refused on hold). */
  motion: boolean;
  /** Why it cannot be used now; null when it can. */
  disabledReason: string | null;
}

const CHOICES: Omit<CommandChoice, 'disabledReason'>[] = [
  { kind: 'scan', label: 'Scan the sky', icon: 'radar', motion: true },
  { kind: 'goto', label: 'Go to orientation', icon: 'my_location', motion: true },
  { kind: 'stow', label: 'Stow', icon: 'shield', motion: true },
  { kind: 'release-stow', label: 'Release stow', icon: 'shield_with_heart', motion: true },
  { kind: 'hold', label: 'Put on maintenance hold', icon: 'front_hand', motion: false },
  { kind: 'release-hold', label: 'Release maintenance hold', icon: 'play_circle', motion: false },
];

/** The commands a role may send to a unit in its current state, each with the reason it is unavailable, if any. */
export function commandChoices(role: Role | null, live: UnitLiveState | null | undefined): CommandChoice[] {
  return CHOICES.map((c) => ({ ...c, disabledReason: reasonUnavailable(c, role, live) }));
}

function reasonUnavailable(c: Omit<CommandChoice, 'disabledReason'>, role: Role | null, live: UnitLiveState | null | undefined): string | null {
  if (!role || role === 'owner') return 'Owners cannot command units.';
  if (role === 'crew' && c.motion) return 'Field crews may put a unit on hold or release it; motion commands come from the control room.';
  const onHold = Boolean(live?.onHold || live?.mode === 'held');
  if (c.motion && onHold) return 'The unit is on maintenance hold: motion is refused until the crew releases the hold.';
  if (c.kind === 'hold' && onHold) return 'Already on maintenance hold.';
  if (c.kind === 'release-hold' && !onHold) return 'The unit is not on hold.';
  if (c.kind === 'release-stow' && live && live.mode !== 'stowed') return 'The unit is not stowed.';
  if (c.kind === 'stow' && live?.mode === 'stowed') return 'Already stowed.';
  return null;
}

/** One sentence naming the unit and the motion, for the confirmation. */
export function describeCommand(serial: string, kind: CommandChoice['kind'], target?: { tiltDeg: number; azimuthDeg: number }): string {
  switch (kind) {
    case 'scan':
      return `${serial} will sweep its whole tilt and azimuth range to map the sky, then return to tracking.`;
    case 'goto':
      return `${serial} will turn its panel to tilt ${target?.tiltDeg ?? '?'}° and azimuth ${target?.azimuthDeg ?? '?'}° (clockwise from north) and resume climbing from there.`;
    case 'stow':
      return `${serial} will drive to its stow position and stay there until stow is released.`;
    case 'release-stow':
      return `${serial} will leave its stow position and start tracking again.`;
    case 'hold':
      return `${serial} will stop its own motion and refuse motion commands until the hold is released.`;
    case 'release-hold':
      return `${serial} will resume tracking and may start to move at once.`;
  }
}

/** Caution shown with every command that moves a unit. */
export const MOTION_CAUTION =
  'This command moves the tracker. Make sure nobody is within reach of the unit: its frame and drives have pinch and crush points. ' +
  'The structure can hold stored mechanical energy (its own weight, wind load, springs) and may move unexpectedly. ' +
  'The modules produce DC voltage whenever light falls on them and cannot be switched off. Do not move units when the wind is above ' +
  "the manufacturer's limit. This software is not a lockout: before any work, stow the unit and isolate and lock out every energy source, " +
  'batteries included. Local codes and licensed practice govern all work on site.';

/** Caution shown with hold and release. */
export const HOLD_CAUTION =
  'A maintenance hold is a software lock, not a lockout. Before touching the unit, isolate and lock out its drive supply and batteries and ' +
  'check that nothing can move; the modules stay live while lit. Releasing the hold lets the unit move at once: make sure everyone is clear. ' +
  'Local codes and licensed practice govern all work on site.';

export const STATUS_LOOK: Record<CommandStatus, { label: string; icon: string }> = {
  queued: { label: 'Waiting for the unit', icon: 'schedule' },
  sent: { label: 'Sent', icon: 'send' },
  acknowledged: { label: 'Accepted by the unit', icon: 'task_alt' },
  completed: { label: 'Done', icon: 'check_circle' },
  rejected: { label: 'Refused', icon: 'block' },
  'timed-out': { label: 'No answer', icon: 'timer_off' },
};

/** Adds or replaces a command in a newest-first history. */
export function upsertCommand(history: readonly CommandView[], c: CommandView, limit = 50): CommandView[] {
  return [c, ...history.filter((x) => x.id !== c.id)].sort((a, b) => Date.parse(b.issuedAt) - Date.parse(a.issuedAt)).slice(0, limit);
}

export function commandParams(c: CommandView): string {
  if (c.kind === 'goto' && c.params) return `tilt ${c.params.tiltDeg}°, azimuth ${c.params.azimuthDeg}°`;
  if (c.kind === 'configure' && c.params?.config) return Object.entries(c.params.config).map(([k, v]) => `${k} ${v}`).join(', ');
  return '';
}
