import type { Role } from '../../../shared/contracts/api';
import type { HoldView } from '../../../shared/contracts/holds';
import type { CommandStatus, CommandView, UnitLiveState } from '../../../shared/contracts/live';
import type { UnitConfig } from '../../../shared/contracts/wire';
import { MOTION_COMMANDS, type CommandKind } from '../../../shared/contracts/wire-format';
import { COMMAND_WORDS, commandWords, SETTING_WORDS } from '../../../shared/contracts/plain-words';
import { siteTime } from '../live/unit-status';

/** What the command panel offers. `goto` carries its target; settings (`configure`) have their own form. */
export interface CommandChoice {
  kind: Exclude<CommandKind, 'configure'>;
  label: string;
  icon: string;
  /** Whether the structure moves (needs the people-clear confirmation; refused on hold). */
  motion: boolean;
  /** Why it cannot be used now; null when it can. */
  disabledReason: string | null;
}

const CHOICES: Omit<CommandChoice, 'disabledReason'>[] = (
  [
    { kind: 'scan', label: COMMAND_WORDS.scan, icon: 'radar' },
    { kind: 'goto', label: COMMAND_WORDS.goto, icon: 'my_location' },
    { kind: 'stow', label: COMMAND_WORDS.stow, icon: 'shield' },
    { kind: 'release-stow', label: COMMAND_WORDS['release-stow'], icon: 'shield_with_heart' },
    { kind: 'hold', label: COMMAND_WORDS.hold, icon: 'front_hand' },
    { kind: 'release-hold', label: 'Release my hold', icon: 'play_circle' },
  ] satisfies Omit<CommandChoice, 'disabledReason' | 'motion'>[]
).map((c) => ({ ...c, motion: MOTION_COMMANDS.includes(c.kind) }));

/** The caller's own hold in force on the unit, if any. */
export function ownHold(holds: readonly HoldView[] | null | undefined, meId: number | null | undefined): HoldView | undefined {
  return meId === null || meId === undefined ? undefined : holds?.find((h) => h.holder.kind === 'person' && h.holder.id === meId);
}

/** Whether motion is refused: a hold is in force, or the unit itself reports that it is held. */
export function isHeld(live: Pick<UnitLiveState, 'onHold' | 'mode' | 'holds'> | null | undefined): boolean {
  return Boolean(live?.onHold || live?.mode === 'held' || live?.holds?.length);
}

/** "Ines Calder" / "Ines Calder and Kwame Ruiz" / "A, B and C". */
export function holderNames(holds: readonly HoldView[]): string {
  const names = holds.map((h) => h.holder.name);
  return names.length <= 1 ? (names[0] ?? '') : `${names.slice(0, -1).join(', ')} and ${names.at(-1)}`;
}

/** The commands a role may send to a unit in its current state, each with the reason it is unavailable, if any. */
export function commandChoices(
  role: Role | null,
  live: UnitLiveState | null | undefined,
  meId: number | null = null,
  holds: readonly HoldView[] = live?.holds ?? [],
): CommandChoice[] {
  return CHOICES.map((c) => ({ ...c, disabledReason: reasonUnavailable(c, role, live, meId, holds) }));
}

function reasonUnavailable(
  c: Omit<CommandChoice, 'disabledReason'>,
  role: Role | null,
  live: UnitLiveState | null | undefined,
  meId: number | null,
  holds: readonly HoldView[],
): string | null {
  if (!role || role === 'owner') return 'Owners cannot command units.';
  if (role === 'crew' && c.motion) return 'Field crews may put a unit on hold or release it; motion commands come from the control room.';
  const held = isHeld(live) || holds.length > 0;
  const mine = ownHold(holds, meId);
  if (c.motion && held) {
    return holds.length
      ? `The unit is on maintenance hold: motion is refused until every hold is released (held by ${holderNames(holds)}).`
      : 'The unit is on maintenance hold: motion is refused until the unit reports that its own hold is released.';
  }
  if (c.kind === 'hold' && mine) return 'You hold this unit already. Release your hold when your work is done.';
  if (c.kind === 'release-hold' && !mine) {
    if (!held) return 'The unit is not on hold.';
    if (!holds.length) return 'The unit reports a hold of its own; it is released on the unit.';
    return `You have no hold on this unit. Each hold is released by its holder${role === 'admin' ? '; as an admin you can release others from the hold list, giving a reason' : ', or by an admin giving a reason'}.`;
  }
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
      return `${serial} will turn its panel to tilt ${target?.tiltDeg ?? '?'}° and azimuth ${target?.azimuthDeg ?? '?'}° (clockwise from north) and resume tracking from there.`;
    case 'stow':
      return `${serial} will drive to its stow position and stay there until stow is released.`;
    case 'release-stow':
      return `${serial} will leave its stow position and start tracking again.`;
    case 'hold':
      return `${serial} will stop its own motion and refuse motion commands until every hold is released. Your hold is in force as soon as you confirm, even before the unit answers; motion still waiting for the unit is cancelled.`;
    case 'release-hold':
      return `${serial} will resume tracking and may start to move at once.`;
  }
}

/** What releasing a hold does: the unit moves again only when the last hold goes. */
export function describeRelease(serial: string, hold: HoldView, holds: readonly HoldView[], meId: number | null): string {
  const others = holds.filter((h) => h.id !== hold.id);
  const whose = hold.holder.kind === 'person' && hold.holder.id === meId ? 'Your hold' : `The hold of ${hold.holder.name}`;
  if (others.length)
    return `${whose} on ${serial} ends. ${serial} stays held by ${holderNames(others)} and does not move until every hold is released.`;
  return `${whose} on ${serial} ends. It is the last hold: ${serial} will resume tracking and may start to move at once.`;
}

/** Plain names of the unit settings, for the confirmation and the history. */
export const SETTING_LABELS: Record<keyof UnitConfig, { label: string; unit: string }> = SETTING_WORDS;

export function describeSettings(config: UnitConfig): string {
  return Object.entries(config)
    .filter(([, v]) => v !== undefined && v !== null)
    .map(([k, v]) => {
      const l = (SETTING_LABELS as Partial<Record<string, { label: string; unit: string }>>)[k] ?? { label: 'another setting', unit: '' };
      return `${l.label} ${v}${l.unit ? (l.unit === '°' ? '°' : ` ${l.unit}`) : ''}`;
    })
    .join(', ');
}

export function describeConfigure(serial: string, config: UnitConfig): string {
  return `${serial} will take the new settings (${describeSettings(config)}) at once; how it seeks and moves changes from then on.`;
}

/** Automatic wind stow moves units without anyone sending a command; only a hold keeps a unit still. */
export const WIND_STOW_CAUTION = 'Automatic wind stow can still move any unit that is not on hold, without a command.';

/** Caution shown with every command that moves a unit. */
export const MOTION_CAUTION =
  'This command moves the tracker. Make sure nobody is within reach of the unit: its frame and drives have pinch and crush points. ' +
  'The structure can hold stored mechanical energy (its own weight, wind load, springs) and may move unexpectedly. ' +
  'The modules produce DC voltage whenever light falls on them and cannot be switched off. Do not move units when the wind is above ' +
  `the manufacturer's limit. ${WIND_STOW_CAUTION} This software is not a lockout: before any work, stow the unit and isolate and lock out ` +
  'every energy source, batteries included. Local codes and licensed practice govern all work on site.';

/** Caution shown when a hold is placed. */
export const HOLD_CAUTION =
  'A maintenance hold is a software lock, not a lockout. Before touching the unit, isolate and lock out its drive supply and batteries and ' +
  'check that nothing can move; the modules stay live while lit. Releasing the hold lets the unit move at once, by command or by automatic ' +
  'wind stow: make sure everyone is clear. ' +
  'Local codes and licensed practice govern all work on site.';

/** Caution shown when a hold is released. */
export const RELEASE_CAUTION =
  'Releasing the last hold lets the unit move at once: its frame and drives have pinch and crush points and may carry stored mechanical energy. ' +
  'Make sure everyone is clear of the unit. Once no hold is left, automatic wind stow can move it too, without a command. ' +
  'A hold is a software lock, not a lockout: remove locks and tags, restore energy and hand the unit back ' +
  "only as your site's lockout/tagout procedure and the manufacturer's instructions say. The modules stay live while lit. " +
  'Local codes and licensed practice govern all work on site.';

/** Caution shown with new unit settings. */
export const CONFIGURE_CAUTION =
  'New settings change how the tracker seeks and moves, and it may start to move at once to act on them. Make sure nobody is within reach of the unit: ' +
  `its frame and drives have pinch and crush points. ${WIND_STOW_CAUTION} This software is not a lockout: before any work, stow the unit and ` +
  "isolate and lock out every energy source, batteries included, as your site's lockout/tagout procedure says. " +
  'Local codes and licensed practice govern all work on site.';

export const STATUS_LOOK: Record<CommandStatus, { label: string; icon: string }> = {
  queued: { label: 'Waiting for the unit', icon: 'schedule' },
  sent: { label: 'Sent', icon: 'send' },
  acknowledged: { label: 'Accepted by the unit', icon: 'task_alt' },
  completed: { label: 'Done', icon: 'check_circle' },
  rejected: { label: 'Refused', icon: 'block' },
  'timed-out': { label: 'No answer', icon: 'timer_off' },
  cancelled: { label: 'Cancelled', icon: 'cancel' },
};

/** What a queued command is waiting for, in words: the unit is offline; motion and settings expire, holds wait. */
export function queuedNote(c: Pick<CommandView, 'kind' | 'status' | 'expiresAt'>, timeZone: string): string | null {
  if (c.status !== 'queued') return null;
  if (c.kind === 'hold')
    return 'Queued: the unit is offline. The hold is in force already (motion commands are refused); the unit gets it when it reconnects.';
  if (c.kind === 'release-hold') return 'Queued: the unit is offline. It gets the release when it reconnects and may move at once then.';
  if (c.expiresAt) return `Queued: the unit is offline. It expires at ${siteTime(c.expiresAt, timeZone)} if the unit does not reconnect.`;
  return 'Queued: the unit is offline.';
}

/** Adds or replaces a command in a newest-first history. */
export function upsertCommand(history: readonly CommandView[], c: CommandView, limit = 50): CommandView[] {
  return [c, ...history.filter((x) => x.id !== c.id)].sort((a, b) => Date.parse(b.issuedAt) - Date.parse(a.issuedAt)).slice(0, limit);
}

/** A command as the history names it: its plain name and what it carries ("Go to orientation: tilt 30°, azimuth 180°"). */
export function commandText(c: CommandView): string {
  const params = commandParams(c);
  return params ? `${commandWords(c.kind)}: ${params}` : commandWords(c.kind);
}

export function commandParams(c: CommandView): string {
  if (c.kind === 'goto' && c.params) return `tilt ${c.params.tiltDeg}°, azimuth ${c.params.azimuthDeg}°`;
  if (c.kind === 'configure' && c.params?.config) return describeSettings(c.params.config);
  return '';
}
