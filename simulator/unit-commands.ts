/**
 * Which commands a unit refuses, and why: the firmware's preconditions, checked before anything moves. A refused
 * command gets one `rejected` ack with the reason; an accepted one is carried out by the unit (unit-model.ts).
 */
import type { Command } from '../shared/contracts/wire';
import type { AxisSpec } from './actuator';
import { MOTION_COMMANDS } from '../shared/contracts/wire-format';

/** What the checks need to know about the unit. */
export interface CommandContext {
  held: boolean;
  faultCode: string | null;
  /** Stowed by command, by wind, or stuck in stow. */
  manualStow: boolean;
  windStow: boolean;
  stuckStowed: boolean;
  stowGustMs: number;
  tiltSpec: AxisSpec;
  azimuthSpec: AxisSpec;
  tiltEncoderDeg: number;
  azimuthEncoderDeg: number;
}

const MOTION_KINDS: ReadonlySet<Command['kind']> = new Set<Command['kind']>(MOTION_COMMANDS);

/** The reason a unit refuses the command, or null when it accepts it. */
export function commandRefusal(cmd: Command, u: CommandContext): string | null {
  const motion = MOTION_KINDS.has(cmd.kind);
  if (motion && u.held) return 'unit is on maintenance hold';
  if (motion && u.faultCode !== null) return `unit is in fault: ${u.faultCode}`;
  const stowed = u.manualStow || u.windStow || u.stuckStowed;
  switch (cmd.kind) {
    case 'release-stow':
      return u.windStow ? `gusts above the stow limit (${u.stowGustMs} m/s)` : null;
    case 'goto': {
      if (stowed) return 'unit is stowed; release the stow first';
      if (cmd.tiltDeg === undefined && cmd.azimuthDeg === undefined) return 'goto needs tiltDeg and/or azimuthDeg';
      const t = cmd.tiltDeg ?? u.tiltEncoderDeg;
      const a = cmd.azimuthDeg ?? u.azimuthEncoderDeg;
      if (t < u.tiltSpec.minDeg || t > u.tiltSpec.maxDeg) return `tiltDeg outside ${u.tiltSpec.minDeg}…${u.tiltSpec.maxDeg}`;
      if (a < u.azimuthSpec.minDeg || a > u.azimuthSpec.maxDeg) return `azimuthDeg outside ${u.azimuthSpec.minDeg}…${u.azimuthSpec.maxDeg}`;
      return null;
    }
    case 'scan':
      return stowed ? 'unit is stowed; release the stow first' : null;
    case 'configure':
      return !cmd.config || Object.keys(cmd.config).length === 0 ? 'configure needs a config' : null;
    default:
      return null;
  }
}
