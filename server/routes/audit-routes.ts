import { Router } from 'express';
import { z } from 'zod';
import { AUDIT_OFFSET_MAX, AUDIT_PAGE_MAX } from '../../shared/contracts/audit';
import type { AuditService } from '../services/audit-service';
import { requireRole } from './access';
import { parse } from './validation';

const iso = z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' });
const auditQuery = z.strictObject({
  action: z
    .string()
    .regex(/^[a-z][a-z0-9-]{0,63}$/, 'Must be an action name such as alarm-acknowledge.')
    .optional(),
  userId: z.coerce
    .number({ error: 'Must be a positive whole number.' })
    .int('Must be a positive whole number.')
    .positive('Must be a positive whole number.')
    .optional(),
  target: z.string().min(1, 'Must not be empty.').max(128, 'Must be at most 128 characters.').optional(),
  from: iso.optional(),
  to: iso.optional(),
  limit: z.coerce
    .number({ error: `Must be between 1 and ${AUDIT_PAGE_MAX}.` })
    .int(`Must be between 1 and ${AUDIT_PAGE_MAX}.`)
    .min(1, `Must be between 1 and ${AUDIT_PAGE_MAX}.`)
    .max(AUDIT_PAGE_MAX, `Must be between 1 and ${AUDIT_PAGE_MAX}.`)
    .default(50),
  offset: z.coerce
    .number({ error: `Must be between 0 and ${AUDIT_OFFSET_MAX}.` })
    .int(`Must be between 0 and ${AUDIT_OFFSET_MAX}.`)
    .min(0, `Must be between 0 and ${AUDIT_OFFSET_MAX}.`)
    .max(AUDIT_OFFSET_MAX, `Must be between 0 and ${AUDIT_OFFSET_MAX}.`)
    .default(0),
});

/**
 * The audit log for admins. Mounted behind requireSession.
 *   GET /audit?action&userId&target&from&to&limit&offset   newest first, with the total for paging
 */
export function auditRoutes(audit: AuditService): Router {
  const r = Router();
  r.get('/audit', requireRole('administer'), async (req, res) => {
    res.json(await audit.list(parse(auditQuery, req.query)));
  });
  return r;
}
