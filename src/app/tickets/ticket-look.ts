import type { SlaClockView, TicketState, TicketView } from '../../../shared/contracts/tickets';

/** Plain words for ticket states, with an icon: state is always shown by text and icon together. */
export const TICKET_STATE_LOOK: Record<TicketState, { label: string; icon: string }> = {
  new: { label: 'New', icon: 'fiber_new' },
  dispatched: { label: 'Dispatched', icon: 'assignment_ind' },
  acknowledged: { label: 'Acknowledged by crew', icon: 'thumb_up' },
  'on-site': { label: 'Crew on site', icon: 'engineering' },
  waiting: { label: 'Waiting', icon: 'hourglass_top' },
  resolved: { label: 'Resolved', icon: 'task_alt' },
  closed: { label: 'Closed', icon: 'inventory_2' },
  reopened: { label: 'Reopened', icon: 'restart_alt' },
  cancelled: { label: 'Cancelled', icon: 'block' },
};

export const stateLook = (s: string) => TICKET_STATE_LOOK[s as TicketState] ?? { label: s, icon: 'help' };

/** The button that makes each move, as the person making it would say it. */
export const MOVE_LABEL: Record<TicketState, { label: string; icon: string }> = {
  new: { label: 'New', icon: 'fiber_new' },
  dispatched: { label: 'Dispatch', icon: 'send' },
  acknowledged: { label: 'Acknowledge', icon: 'thumb_up' },
  'on-site': { label: 'Check in on site', icon: 'login' },
  waiting: { label: 'Put on waiting', icon: 'hourglass_top' },
  resolved: { label: 'Resolve and check out', icon: 'task_alt' },
  closed: { label: 'Close', icon: 'inventory_2' },
  reopened: { label: 'Reopen', icon: 'restart_alt' },
  cancelled: { label: 'Cancel ticket', icon: 'block' },
};

export const WAITING_REASON_LABEL: Record<string, string> = {
  parts: 'Waiting for parts',
  access: 'Waiting for site access',
  weather: 'Waiting for weather',
  warranty: 'Waiting for a warranty decision',
  owner: 'Waiting for the owner',
};

export const CLOCK_LABEL: Record<SlaClockView['name'], string> = {
  acknowledge: 'Acknowledge',
  onSite: 'On site',
  fix: 'Fixed',
};

export const CLOCK_STATUS_LOOK: Record<SlaClockView['status'], { label: string; icon: string; cssClass: string }> = {
  running: { label: 'Running', icon: 'timer', cssClass: 'clock-running' },
  met: { label: 'Met', icon: 'check_circle', cssClass: 'clock-met' },
  breached: { label: 'Breached', icon: 'alarm_off', cssClass: 'clock-breached' },
  stopped: { label: 'Stopped', icon: 'stop_circle', cssClass: 'clock-stopped' },
};

/** The clock that matters next: the first one still running, else the last one. */
export function currentClock(t: TicketView): SlaClockView | undefined {
  return t.clocks.find((c) => c.status === 'running' || (c.status === 'breached' && c.metAt === null)) ?? t.clocks.at(-1);
}

/** Overdue first, then by the next due time; finished tickets last. */
export function sortTickets(list: readonly TicketView[]): TicketView[] {
  const done = (t: TicketView) => ['resolved', 'closed', 'cancelled'].includes(t.state);
  const overdue = (t: TicketView) => t.clocks.some((c) => c.status === 'breached' && c.metAt === null);
  const due = (t: TicketView) => Date.parse(currentClock(t)?.dueAt ?? t.openedAt);
  return [...list].sort(
    (a, b) => Number(done(a)) - Number(done(b)) || Number(overdue(b)) - Number(overdue(a)) || due(a) - due(b) || b.id - a.id,
  );
}

/**
 * What a crew confirms when checking in (own wording; job.md §6 cautions). A software hold is not lockout/tagout.
 */
export const CHECK_IN_CAUTIONS: readonly string[] = [
  'Moving parts and pinch points: the unit and its neighbours can move; stay clear of every drive and the panel’s sweep.',
  'Stored mechanical energy: gravity, wind back-driving, springs and batteries can move a structure with its drives off.',
  'The modules are electrically live whenever light falls on them; DC arcs do not go out by themselves.',
  'Do not work at height or under a unit above the manufacturer’s wind limit, while a stow is active, or with lightning near.',
  'This software hold is not lockout/tagout: stow the unit, then isolate and lock out every energy source as your site procedure requires.',
  'Local electrical codes and licensed, qualified practice govern the work; this tool does not replace your safety program.',
];
