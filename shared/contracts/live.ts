import type { AlarmLiveItem } from './alarms';
import type { HoldView } from './holds';
import type { UnitConfig } from './wire';
import type { CommandKind, UnitMode } from './wire-format';
import type { NotificationView } from './notifications';

/** The latest known state of a unit, as pushed to dashboards (at most once a second per unit). */
export interface UnitLiveState {
  unitId: number;
  serial: string;
  siteId: number;
  online: boolean;
  /** Unit timestamp of the latest report (ISO UTC), null before the first. */
  lastReportAt: string | null;
  mode: UnitMode | null;
  poaWm2: number | null;
  dcPowerW: number | null;
  tiltDeg: number | null;
  azimuthDeg: number | null;
  cmdTiltDeg: number | null;
  cmdAzimuthDeg: number | null;
  /** Photodifferentials: plus − minus detector [W/m²]. */
  tiltDiffWm2: number | null;
  azimuthDiffWm2: number | null;
  moduleTempC: number | null;
  /** Whether any maintenance hold is in force (see `holds`). */
  onHold: boolean;
  /** The holds in force, oldest first: who holds the unit and since when. */
  holds: HoldView[];
}

/** `cancelled`: a queued motion command dropped because a maintenance hold was placed before the unit got it. */
export const COMMAND_STATUSES = ['queued', 'sent', 'acknowledged', 'completed', 'rejected', 'timed-out', 'cancelled'] as const;
export type CommandStatus = (typeof COMMAND_STATUSES)[number];

export interface CommandView {
  id: string;
  unitId: number;
  kind: CommandKind;
  params: { tiltDeg?: number; azimuthDeg?: number; config?: UnitConfig } | null;
  status: CommandStatus;
  reason: string | null;
  issuedBy: { id: number; name: string };
  issuedAt: string;
  sentAt: string | null;
  ackedAt: string | null;
  finishedAt: string | null;
  /** For a queued command that expires: when it times out if the unit has not come online by then. Null otherwise. */
  expiresAt: string | null;
}

export interface IssueCommandRequest {
  kind: CommandKind;
  tiltDeg?: number;
  azimuthDeg?: number;
  config?: UnitConfig;
  /**
   * Required `true` for commands that move the structure, for `release-hold` (the unit may move at once) and for
   * `configure`: the caller confirms nobody is within reach.
   */
  confirm?: boolean;
  /** `hold` only: what the work is (shown to everyone who sees the unit). */
  note?: string;
  /** `release-hold` only: the hold to release. Without it the caller's own hold is released; another's needs an admin. */
  holdId?: number;
  /** `release-hold` only: why; required when an admin releases a hold that is not their own. */
  reason?: string;
}

/** Browser → server over `/ws`. */
export type LiveClientMessage =
  | { type: 'subscribe'; siteId?: number; unitId?: number; fleet?: boolean }
  | { type: 'unsubscribe'; siteId?: number; unitId?: number; fleet?: boolean };

/** Server → browser over `/ws`. A `snapshot` follows every subscribe (and so every reconnect). */
export type LiveServerMessage =
  | { type: 'hello'; userId: number; role: string }
  | { type: 'snapshot'; siteId?: number; unitId?: number; fleet?: boolean; units: UnitLiveState[] }
  /** Changed units since the last message, each at most once a second. */
  | { type: 'units'; units: UnitLiveState[] }
  | { type: 'command'; command: CommandView }
  /** An alarm raised, updated, cleared or acknowledged, or a wind-stow event. */
  | { type: 'alarm'; alarm: AlarmLiveItem }
  /** For this person only: a new notification (or null when some were read), and how many are unread now. */
  | { type: 'notification'; notification: NotificationView | null; unread: number }
  | { type: 'error'; code: string; message: string };
