/**
 * Work orders ("tickets") as the API sends them, and the rules both sides read: the lifecycle table (who may move a
 * ticket from which state to which, and what the move needs), the SLA clocks' defaults, and the closure vocabulary.
 * Pure data and functions; the server enforces, the dashboard offers only what is allowed.
 */
import type { Role } from './api';
import type { AlarmSeverity } from './alarms';

export const TICKET_STATES = [
  'new',
  'dispatched',
  'acknowledged',
  'on-site',
  'waiting',
  'resolved',
  'closed',
  'reopened',
  'cancelled',
] as const;
export type TicketState = (typeof TICKET_STATES)[number];

/** States in which the ticket still needs work (the board's open tickets). */
export const OPEN_TICKET_STATES: readonly TicketState[] = ['new', 'dispatched', 'acknowledged', 'on-site', 'waiting', 'reopened'];

/** Why work waits (job.md §3: parts, warranty, access, weather, waiting for owner). */
export const WAITING_REASONS = ['parts', 'access', 'weather', 'warranty', 'owner'] as const;
export type WaitingReason = (typeof WAITING_REASONS)[number];

/** Closure action (common practice: component → failure mode → cause → action). */
export const CLOSURE_ACTIONS = ['replace', 'repair', 'adjust', 'reset', 'clean', 'firmware', 'no-fault-found'] as const;
export type ClosureAction = (typeof CLOSURE_ACTIONS)[number];

/** Root-cause class (common practice). */
export const ROOT_CAUSE_CLASSES = [
  'design',
  'manufacturing',
  'installation',
  'o-and-m',
  'environment',
  'wildlife',
  'vandalism',
  'grid',
  'force-majeure',
] as const;
export type RootCauseClass = (typeof ROOT_CAUSE_CLASSES)[number];

/**
 * Availability category of a ticket's downtime: the information categories of IEC TS 63019:2019 (availability of PV
 * power systems) that decide whether downtime is excused in contractual availability. Category names from memory of the
 * standard's tree (in service → full or partial performance; out of service → technical standby, requested shutdown, out
 * of environmental or electrical specification; non-operative → scheduled maintenance, planned corrective action,
 * forced outage, suspended; force majeure; information unavailable).
 */
export const AVAILABILITY_CATEGORIES = [
  'full-performance',
  'partial-performance',
  'technical-standby',
  'requested-shutdown',
  'out-of-environmental-specification',
  'out-of-electrical-specification',
  'scheduled-maintenance',
  'planned-corrective-action',
  'forced-outage',
  'suspended',
  'force-majeure',
  'information-unavailable',
] as const;
export type AvailabilityCategory = (typeof AVAILABILITY_CATEGORIES)[number];

/** The category a fault's downtime gets until someone says otherwise at resolution. */
export function defaultCategoryOf(kind: string): AvailabilityCategory {
  if (kind === 'comms' || kind === 'site-comms') return 'information-unavailable';
  if (kind === 'trap' || kind === 'drift' || kind === 'hunting' || kind === 'soiling') return 'partial-performance';
  return 'forced-outage';
}

/** One fault, one ticket: the key of a unit's (or a whole site's) fault of one kind. */
export const faultKeyOf = (unitId: number | null, siteId: number, kind: string): string =>
  unitId !== null ? `unit:${unitId}:${kind}` : `site:${siteId}:${kind}`;

/** SLA targets of one severity [minutes from the ticket's opening]. */
export interface SlaTargets {
  acknowledgeMin: number;
  onSiteMin: number;
  fixMin: number;
}

/**
 * Default SLA clocks per severity. Common practice (job.md §3 gives ranges; SPE O&M best-practice guidelines show a
 * similar example table by fault class); contracts vary, so admins may set them per owner.
 */
export const DEFAULT_SLA: Record<AlarmSeverity, SlaTargets> = {
  P1: { acknowledgeMin: 30, onSiteMin: 4 * 60, fixMin: 24 * 60 },
  P2: { acknowledgeMin: 60, onSiteMin: 24 * 60, fixMin: 72 * 60 },
  P3: { acknowledgeMin: 4 * 60, onSiteMin: 5 * 24 * 60, fixMin: 10 * 24 * 60 },
  P4: { acknowledgeMin: 24 * 60, onSiteMin: 30 * 24 * 60, fixMin: 60 * 24 * 60 },
};

/** Who a transition is for: a staff role, or the crew member the ticket is assigned to. */
export type TicketActor = 'technician' | 'engineer' | 'assignee';

/** What a transition needs in its body beyond `to`. */
export type TicketNeed = 'assigneeId' | 'newAssignee' | 'confirm' | 'closure' | 'note' | 'reason' | 'waitingReason';

export interface TicketTransitionRule {
  from: readonly TicketState[];
  to: TicketState;
  by: readonly TicketActor[];
  needs: readonly TicketNeed[];
  /** Check-in places the ticket's hold; check-out, cancel and close release it. */
  hold?: 'place' | 'release';
}

/** The lifecycle. Admins may make every transition; anything not listed answers 409 with the allowed next states. */
export const TICKET_TRANSITIONS: readonly TicketTransitionRule[] = [
  { from: ['new'], to: 'dispatched', by: ['technician', 'engineer'], needs: ['assigneeId'] },
  { from: ['dispatched'], to: 'dispatched', by: ['technician', 'engineer'], needs: ['newAssignee'] },
  { from: ['dispatched'], to: 'acknowledged', by: ['assignee'], needs: [] },
  { from: ['acknowledged'], to: 'on-site', by: ['assignee'], needs: ['confirm'], hold: 'place' },
  { from: ['on-site'], to: 'resolved', by: ['assignee'], needs: ['confirm', 'closure', 'note'], hold: 'release' },
  { from: ['on-site'], to: 'waiting', by: ['assignee'], needs: ['confirm', 'waitingReason'], hold: 'release' },
  { from: ['acknowledged', 'dispatched'], to: 'waiting', by: ['technician', 'engineer', 'assignee'], needs: ['waitingReason'] },
  { from: ['waiting'], to: 'dispatched', by: ['technician', 'engineer'], needs: [] },
  { from: ['waiting'], to: 'acknowledged', by: ['technician', 'engineer'], needs: [] },
  { from: ['resolved'], to: 'closed', by: ['technician', 'engineer'], needs: [], hold: 'release' },
  { from: ['resolved', 'closed'], to: 'reopened', by: ['technician', 'engineer'], needs: ['reason'] },
  { from: ['reopened'], to: 'dispatched', by: ['technician', 'engineer'], needs: ['assigneeId'] },
  {
    from: ['new', 'dispatched', 'acknowledged', 'on-site', 'waiting', 'resolved', 'reopened'],
    to: 'cancelled',
    by: ['technician', 'engineer'],
    needs: ['reason'],
    hold: 'release',
  },
];

/** The rules that let this caller move a ticket out of `state`. */
export function transitionsFor(state: TicketState, role: Role, isAssignee: boolean): TicketTransitionRule[] {
  return TICKET_TRANSITIONS.filter(
    (t) => t.from.includes(state) && (role === 'admin' || t.by.some((a) => (a === 'assignee' ? isAssignee : a === role))),
  );
}

/** The rule for one move, whoever makes it (undefined when the lifecycle has no such move). */
export const ruleFor = (from: TicketState, to: TicketState): TicketTransitionRule | undefined =>
  TICKET_TRANSITIONS.find((t) => t.to === to && t.from.includes(from));

/** Closure of a resolved ticket (component → failure mode → cause → action). */
export interface TicketClosure {
  component: string;
  failureMode: string;
  cause: string;
  action: ClosureAction;
  rootCauseClass?: RootCauseClass;
}

export type SlaClockName = 'acknowledge' | 'onSite' | 'fix';
export type SlaClockStatus = 'running' | 'met' | 'breached' | 'stopped';

export interface SlaClockView {
  name: SlaClockName;
  dueAt: string;
  /** When the clock's target was reached (acknowledged, on site, resolved); null while running. */
  metAt: string | null;
  status: SlaClockStatus;
}

export interface TicketTransitionView {
  from: TicketState | null;
  to: TicketState;
  at: string;
  /** null for an automatic transition (opened or reopened by an alarm). */
  by: { id: number; name: string } | null;
  note: string | null;
  reason: string | null;
  assignee: { id: number; name: string } | null;
}

export interface TicketAlarmLink {
  alarmId: number;
  kind: string;
  severity: string;
  message: string;
  raisedAt: string;
  /** The alarm's evidence when it was linked. */
  evidence: Record<string, unknown>;
}

export interface TicketPart {
  description: string;
  quantity: number;
}

/** One ticket (`GET /api/tickets/:id`; the list sends the same without transitions and alarms). */
export interface TicketView {
  id: number;
  state: TicketState;
  /** Optimistic lock: send it back with a transition; a stale one answers 409. */
  version: number;
  siteId: number;
  siteName: string;
  unitId: number | null;
  serial: string | null;
  kind: string;
  severity: AlarmSeverity;
  title: string;
  description: string | null;
  assignee: { id: number; name: string } | null;
  openedAt: string;
  /** null when opened automatically from an alarm. */
  openedBy: { id: number; name: string } | null;
  acknowledgedAt: string | null;
  onSiteAt: string | null;
  resolvedAt: string | null;
  closedAt: string | null;
  cancelledAt: string | null;
  waitingReason: WaitingReason | null;
  closure: TicketClosure | null;
  availabilityCategory: AvailabilityCategory;
  lostEnergyKwh: number | null;
  parts: TicketPart[];
  clocks: SlaClockView[];
  /** Moves the caller may make now. */
  next: TicketState[];
  transitions?: TicketTransitionView[];
  alarms?: TicketAlarmLink[];
  /** The ticket's holds in force (from check-in to check-out) and whether each unit has confirmed it. */
  holds?: TicketHoldView[];
  /** Whether the fault looks fixed: open alarms of the unit (or site) and when the ticket's alarms last cleared. */
  health?: { activeAlarms: number; clearSince: string | null };
}

/** `confirmed`: the unit reported it holds; `joined`: added to a hold already in force; `waiting`: not answered yet. */
export type TicketHoldStatus = 'confirmed' | 'joined' | 'waiting' | 'not-confirmed';

export interface TicketHoldView {
  unitId: number;
  serial: string;
  status: TicketHoldStatus;
}
