import { ROLES, type Role } from './api';

/**
 * Who may do what: the one table both the server's `requireRole` checks and the dashboard's navigation and buttons
 * read. Reads of sites, units and alarms are open to every role within its scope (owners see only their own sites);
 * the table names what needs more than that.
 */
export const PERMISSIONS = {
  /** People, owners, site and unit setup, device secrets, the audit log. */
  administer: ['admin'],
  /** Send commands at all (field crews only hold and release: the command service checks the kind). */
  command: ['admin', 'engineer', 'technician', 'crew'],
  /** Send motion commands and settings (what the dashboard offers beyond hold and release). */
  commandMotion: ['admin', 'engineer', 'technician'],
  acknowledgeAlarms: ['technician', 'engineer', 'admin'],
  editHealthSettings: ['engineer', 'admin'],
  /** The health settings screen: every threshold with its range and the history of changes (who, when, why). */
  readHealthSettings: ['engineer', 'technician', 'admin'],
  /** Run the detectors on demand over stored data. */
  runDetectors: ['engineer', 'technician', 'admin'],
  editSurvey: ['admin', 'engineer'],
  /** Proposed survey corrections fitted to a site's scans (proposing, accepting and rejecting them is `editSurvey`). */
  readSurveyRevisions: ['admin', 'engineer', 'technician'],
  /** Work out the detector tilt a site needs and send it to all the site's units. */
  tuneDetectors: ['engineer', 'admin'],
  /** Ingest, broker and rollup counters. */
  readMetrics: ['admin', 'engineer', 'technician'],
  /** Traces and their raw CSV export. */
  readTraces: ['admin', 'engineer', 'technician'],
  /** A site's modelled landscape and its day of hours (the API). */
  readLandscape: ['admin', 'engineer', 'technician', 'crew'],
  /** How the model got its numbers (clear-sky model, turbidity, measured or modelled magnitudes): engineers' detail. */
  readModelDetails: ['admin', 'engineer'],
  /** The landscape screen. */
  openLandscape: ['admin', 'engineer'],
  /** The fleet board (live units). */
  openFleetBoard: ['admin', 'engineer', 'technician', 'crew'],
  /** Open a ticket by hand (alarms open theirs automatically). */
  openTickets: ['technician', 'engineer', 'admin'],
  /** Move tickets through their lifecycle (the ticket service checks who may make which move). */
  moveTickets: ['technician', 'engineer', 'admin', 'crew'],
  /**
   * Add photos and documents to a ticket: the control room on any ticket, a crew member on tickets assigned to them
   * (the file service checks that). Owners read their own sites' tickets' files and add none.
   */
  addTicketFiles: ['technician', 'engineer', 'admin', 'crew'],
  /** A crew member's own list of assigned tickets (their landing page). */
  openMyWork: ['crew'],
  /** The mail outbox: every message sent, with its delivery. */
  readOutbox: ['admin'],
  /** Read and change the on-call rota. */
  manageOnCall: ['technician', 'engineer', 'admin'],
  /** One's own notifications and notification settings (owners hear about their own sites only). */
  receiveNotifications: ROLES,
  /** Owners read their own sites' tickets only. */
  readTickets: ROLES,
  /** Progress of the demo's generated past (the admin page's line). */
  readDemoHistory: ['admin'],
  readAlarms: ROLES,
  readSites: ROLES,
  /** Monthly statements of a site and their CSV: owners for their own sites, staff for every site. */
  readStatements: ROLES,
  /** Restate a locked month with a reason (a new version; the earlier stays readable, marked superseded). */
  restateStatements: ['engineer', 'admin'],
  /** The owners' portfolio home (this month and the last twelve of each of their sites). */
  openPortfolio: ['owner'],
  /**
   * The unit page. Owners get it read-only for units of their own sites (live state, the last hour, alarms): the API
   * scopes every unit read to the caller's owner, and the page shows no commands, settings or survey to them.
   */
  openUnitPage: ROLES,
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

/** The roles that hold a permission. */
export const rolesWith = (p: Permission): readonly Role[] => PERMISSIONS[p];

/** Whether a role (none when signed out) holds a permission. */
export function may(role: Role | null | undefined, p: Permission): boolean {
  return role !== null && role !== undefined && (PERMISSIONS[p] as readonly Role[]).includes(role);
}
