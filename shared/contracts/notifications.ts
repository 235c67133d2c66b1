/**
 * Notifications: what a person chooses to hear about, the on-call rota, and the dashboard's notifications (the bell).
 * Pure data; the server decides who is told what (server/services/notification-service.ts).
 */
import { ALARM_SEVERITIES, type AlarmSeverity } from './alarms';

/** A person's choice. `siteIds` null: every site they may see. */
export interface NotificationSettings {
  siteIds: number[] | null;
  severities: AlarmSeverity[];
  /** By e-mail. */
  email: boolean;
  /** In the dashboard (the bell). */
  dashboard: boolean;
}

/**
 * Everyone starts with every site in their scope, every severity, both ways. A P1 page and its escalation reach the
 * people they are for by both ways whatever they chose: a critical fault is never missed for a setting.
 */
export const DEFAULT_NOTIFICATION_SETTINGS: NotificationSettings = {
  siteIds: null,
  severities: [...ALARM_SEVERITIES],
  email: true,
  dashboard: true,
};

export const NOTIFICATION_KINDS = ['assigned', 'p1-page', 'escalation', 'sla-breach', 'resolved', 'digest'] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

export interface NotificationView {
  id: number;
  kind: NotificationKind;
  title: string;
  body: string;
  ticketId: number | null;
  siteId: number | null;
  createdAt: string;
  readAt: string | null;
}

/** `GET /api/notifications`: the newest first, and how many are unread in all. */
export interface NotificationList {
  unread: number;
  items: NotificationView[];
}

/** One stretch of the on-call rota: a person on call for a site, or for the whole fleet (`siteId` null). */
export interface OnCallEntry {
  userId: number;
  siteId: number | null;
  /** ISO 8601 instants; `from` < `to`. */
  from: string;
  to: string;
}

export interface OnCallEntryView extends OnCallEntry {
  id: number;
  userName: string;
  role: string;
  siteName: string | null;
}

/** `GET /api/on-call`: the whole rota, who is on call now, and who may be put on it. */
export interface OnCallRota {
  entries: OnCallEntryView[];
  now: OnCallEntryView[];
  candidates: { id: number; name: string; role: string }[];
}

/** Roles that may be on call (people who can go out or send someone). */
export const ON_CALL_ROLES = ['technician', 'crew', 'engineer', 'admin'] as const;
