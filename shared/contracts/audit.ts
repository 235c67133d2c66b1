/**
 * The audit log as `GET /api/audit` returns it (admins only): who did what to which target, newest first. The log is
 * append-only; every service writes its own actions (`sign-in`, `command`, `alarm-acknowledge`, …). Action names are
 * lower-case words joined by hyphens; new ones may appear at any time and are shown by name.
 */

export interface AuditLogEntry {
  id: number;
  /** ISO 8601 UTC. */
  at: string;
  /** The person who acted; null for an attempt nobody could be tied to (a failed sign-in for an unknown e-mail). */
  user: { id: number; name: string; email: string } | null;
  action: string;
  /** What was acted on, as `<kind>:<id>` (`unit:12`, `site:3`, `alarm:40`, `user:5`, `owner:2`), or free text such
   * as the e-mail of a failed sign-in; null when the action has no target. */
  target: string | null;
  /** The target in words (`Unit QHL-2401`, `Site Harbourside Library Roof`); the target itself when it is free text. */
  targetLabel: string | null;
  /** What else the service recorded (parameters, before and after), or null. */
  detail: unknown;
}

export interface AuditPage {
  /** Entries matching the filters, over all pages. */
  total: number;
  limit: number;
  offset: number;
  entries: AuditLogEntry[];
}

/** Query of `GET /api/audit`: every filter optional; `from` inclusive, `to` exclusive. */
export interface AuditQuery {
  action?: string;
  userId?: number;
  target?: string;
  from?: string;
  to?: string;
  /** 1…200, default 50. */
  limit?: number;
  /** 0…100000, default 0. */
  offset?: number;
}

export const AUDIT_PAGE_MAX = 200;
export const AUDIT_OFFSET_MAX = 100_000;
