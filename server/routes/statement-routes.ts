import { Router } from 'express';
import { z } from 'zod';
import type { AuditService } from '../services/audit-service';
import { statementCsv, type StatementService } from '../services/statement-service';
import type { StatementLockService } from '../services/statement-lock-service';
import { statementPdf } from '../services/statement-pdf';
import { callerOf, requireRole } from './access';
import { parse } from './validation';

const params = z.strictObject({
  id: z.coerce.number().int().positive('Must be a positive whole number.'),
  month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'Must be a calendar month such as 2026-11.'),
});
const siteParam = z.strictObject({ id: z.coerce.number().int().positive('Must be a positive whole number.') });
const versionQuery = z.strictObject({
  version: z.coerce.number().int('Must be a whole number.').positive('Must be a version number from 1.').optional(),
});
const restateBody = z.strictObject({
  reason: z.string().trim().min(3, 'Say why the month is restated (at least 3 characters).').max(500, 'At most 500 characters.'),
});

/**
 * Monthly statements of a site, in the site's calendar month:
 *   GET  /sites/:id/statements                   months with data, newest first (locked, version, restatement suggested)
 *   GET  /sites/:id/statements/:month            the statement (JSON); :month = YYYY-MM; ?version=N an earlier version
 *   GET  /sites/:id/statements/:month.csv        the same as CSV (RFC 4180; audited as an export)
 *   GET  /sites/:id/statements/:month.pdf        the same as PDF (made here with pdfkit; audited as an export)
 *   POST /sites/:id/statements/:month/restate    { reason }: a new version of a locked month (engineers, admins)
 *   GET  /sites/:id/statement-trend              this month so far and the twelve before it (headline figures)
 * Owners see their own sites only (404 elsewhere); staff see every site.
 */
export function statementRoutes(statements: StatementService, audit: AuditService, locks: StatementLockService): Router {
  const r = Router();

  r.get('/sites/:id/statements', requireRole('readStatements'), async (req, res) => {
    res.json(await statements.months(callerOf(req), parse(siteParam, req.params).id));
  });

  r.get('/sites/:id/statement-trend', requireRole('readStatements'), async (req, res) => {
    res.json(await statements.trend(callerOf(req), parse(siteParam, req.params).id));
  });

  r.get('/sites/:id/statements/:month.csv', requireRole('readStatements'), async (req, res) => {
    const p = parse(params, req.params);
    const q = parse(versionQuery, req.query);
    const c = callerOf(req);
    const s = await statements.statement(c, p.id, p.month, q.version ?? null);
    await audit.record(c, 'statement-export', `site:${s.siteId}`, { month: s.month, format: 'csv', version: s.lock?.version ?? null });
    res.type('text/csv; charset=utf-8; header=present').attachment(`statement-site-${s.siteId}-${s.month}.csv`).send(statementCsv(s));
  });

  r.get('/sites/:id/statements/:month.pdf', requireRole('readStatements'), async (req, res) => {
    const p = parse(params, req.params);
    const q = parse(versionQuery, req.query);
    const c = callerOf(req);
    const s = await statements.statement(c, p.id, p.month, q.version ?? null);
    const pdf = await statementPdf(s);
    await audit.record(c, 'statement-export', `site:${s.siteId}`, { month: s.month, format: 'pdf', version: s.lock?.version ?? null });
    res.type('application/pdf').attachment(`statement-site-${s.siteId}-${s.month}.pdf`).send(pdf);
  });

  r.post('/sites/:id/statements/:month/restate', requireRole('restateStatements'), async (req, res) => {
    const p = parse(params, req.params);
    const body = parse(restateBody, req.body);
    res.json(await locks.restate(callerOf(req), p.id, p.month, body.reason));
  });

  r.get('/sites/:id/statements/:month', requireRole('readStatements'), async (req, res) => {
    const p = parse(params, req.params);
    const q = parse(versionQuery, req.query);
    res.json(await statements.statement(callerOf(req), p.id, p.month, q.version ?? null));
  });

  return r;
}
