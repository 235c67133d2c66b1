/** The mail module's outbox as the API sends it (`GET /api/mail/outbox`, admins only). */

export const MAIL_STATUSES = ['queued', 'sent', 'failed'] as const;
/** `queued` until the mail server takes the message (tries still left); `failed` after the last try failed. */
export type MailStatus = (typeof MAIL_STATUSES)[number];

export interface OutboxMessage {
  id: number;
  /** What the message is for: assigned, p1-page, escalation, sla-breach, resolved, digest, … */
  kind: string;
  to: string[];
  subject: string;
  body: string;
  /** File names of the attachments (their content is not kept). */
  attachments: string[];
  status: MailStatus;
  attempts: number;
  /** The last try's error, while queued or once failed. */
  lastError: string | null;
  createdAt: string;
  sentAt: string | null;
}
