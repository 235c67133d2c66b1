import { Router } from 'express';
import { z } from 'zod';
import { ALARM_SEVERITIES } from '../../shared/contracts/alarms';
import { MAIL_STATUSES } from '../../shared/contracts/mail';
import type { MailService } from '../services/mail-service';
import type { NotificationService } from '../services/notification-service';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const limit = (max: number) => z.coerce.number().int().min(1, `Must be between 1 and ${max}.`).max(max, `Must be between 1 and ${max}.`);

const outboxQuery = z.strictObject({
  status: z.enum(MAIL_STATUSES, `Must be one of ${MAIL_STATUSES.join(', ')}.`).optional(),
  limit: limit(1000).optional(),
});

const settingsBody = z.strictObject({
  siteIds: z
    .array(z.number().int().positive('Site ids are positive whole numbers.'), 'A list of site ids, or null for every site.')
    .max(1000)
    .nullable(),
  severities: z
    .array(z.enum(ALARM_SEVERITIES, 'Must be P1, P2, P3 or P4.'))
    .min(1, 'Choose at least one severity (P1 pages reach the people on call whatever is chosen here).'),
  email: z.boolean('true or false'),
  dashboard: z.boolean('true or false'),
});

const listQuery = z.strictObject({
  unread: z.enum(['true', 'false'], 'true or false').optional(),
  limit: limit(200).optional(),
});

const instant = z.iso.datetime({ offset: true, error: 'An ISO 8601 time with its offset, such as 2026-12-03T08:00:00Z.' });
const rotaBody = z.strictObject({
  entries: z
    .array(
      z.strictObject({
        userId: z.number().int().positive(),
        siteId: z.number().int().positive().nullable(),
        from: instant,
        to: instant,
      }),
    )
    .max(2000, 'At most 2000 entries.'),
});

/**
 * Mail and notifications. Mounted behind requireSession.
 *   GET  /mail/outbox?status&limit               admin: every message sent, newest first, with its delivery
 *   GET  /me/notification-settings               one's own choice (the defaults until changed)
 *   PUT  /me/notification-settings { siteIds | null, severities, email, dashboard }
 *   GET  /notifications?unread=true&limit         one's own, newest first, with the unread count
 *   POST /notifications/:id/read                  marks one's own notification read (another's is 404)
 *   GET  /on-call                                 technician, engineer, admin: the rota and who is on call now
 *   PUT  /on-call { entries: [{ userId, siteId | null, from, to }] }   the same: replaces the whole rota
 */
export function notificationRoutes(notifications: NotificationService, mail: MailService): Router {
  const r = Router();

  r.get('/mail/outbox', requireRole('readOutbox'), async (req, res) => {
    const q = parse(outboxQuery, req.query);
    res.json(await mail.outbox({ ...(q.status ? { status: q.status } : {}), limit: q.limit ?? 200 }));
  });

  r.get('/me/notification-settings', requireRole('receiveNotifications'), async (req, res) => {
    res.json(await notifications.settings(callerOf(req)));
  });

  r.put('/me/notification-settings', requireRole('receiveNotifications'), async (req, res) => {
    res.json(await notifications.setSettings(callerOf(req), parse(settingsBody, req.body, 'The notification settings')));
  });

  r.get('/notifications', requireRole('receiveNotifications'), async (req, res) => {
    const q = parse(listQuery, req.query);
    res.json(await notifications.list(callerOf(req), { unreadOnly: q.unread === 'true', limit: q.limit ?? 50 }));
  });

  r.post('/notifications/:id/read', requireRole('receiveNotifications'), async (req, res) => {
    res.json(await notifications.read(callerOf(req), parse(idParam, req.params).id));
  });

  r.get('/on-call', requireRole('manageOnCall'), async (_req, res) => {
    res.json(await notifications.rota());
  });

  r.put('/on-call', requireRole('manageOnCall'), async (req, res) => {
    res.json(await notifications.setRota(callerOf(req), parse(rotaBody, req.body, 'The on-call rota').entries));
  });
  return r;
}
