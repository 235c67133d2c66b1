/** What the health engine raises: alarm kinds, their subjects and the alarm record itself. */
import type { AlarmKind, AlarmSeverity, AlarmState } from '../../shared/contracts/alarms';

/** The unit (or, for site alarms, the site) an alarm is about. */
export interface AlarmSubject {
  /** null for a site alarm. */
  unitId: number | null;
  serial: string | null;
  siteId: number;
}

export interface AlarmDetail {
  severity: AlarmSeverity;
  /** One sentence: what is wrong, with the numbers. */
  message: string;
  /** What to do about it. */
  advice: string;
  /** Readings and model at the time (snapshot). */
  evidence: Record<string, unknown>;
}

export interface Alarm extends AlarmSubject, AlarmDetail {
  /** Engine-local key; the server assigns its own database id. */
  key: string;
  kind: AlarmKind;
  state: AlarmState;
  /** When the condition was first seen (start of the delay-on) [ms]. */
  firstSeenMs: number;
  /** When the alarm was raised (after the delay-on) [ms]. */
  raisedMs: number;
  /** Latest time the condition was seen [ms]. */
  lastSeenMs: number;
  clearedMs: number | null;
  /** Why it cleared ('condition ended', 'superseded by site alarm', …). */
  clearReason: string | null;
}

/** A stow episode of a unit (an event, not a fault). */
export interface StowEvent {
  unitId: number;
  serial: string;
  siteId: number;
  atMs: number;
  kind: 'stowed' | 'released';
  message: string;
}
