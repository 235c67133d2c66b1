import { Router } from 'express';
import { z } from 'zod';
import type { AuditService } from '../services/audit-service';
import { statementCsv, type StatementService } from '../services/statement-service';
import { callerOf, requireRole } from './access';
import { parse } from './validation';

const params = z.strictObject({
  id: z.coerce.number().int().positive('Must be a positive whole number.'),
  month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'Must be a calendar month such as 2026-11.'),
});
const siteParam = z.strictObject({ id: z.coerce.number().int().positive('Must be a positive whole number.') });

/**
 * Monthly statements of a site, in the site's calendar month:
 *   GET /sites/:id/statements                 months with data, newest first
 *   GET /sites/:id/statements/:month          the statement (JSON); :month = YYYY-MM
 *   GET /sites/:id/statements/:month.csv      the same as CSV (RFC 4180; audited as an export)
 *   GET /sites/:id/statement-trend            this month so far and the twelve before it (headline figures)
 * Owners see their own sites only (404 elsewhere); staff see every site.
 */
export function statementRoutes(statements: StatementService, audit: AuditService): Router {
  const r = Router();

  r.get('/sites/:id/statements', requireRole('readStatements'), async (req, res) => {
    res.json(await statements.months(callerOf(req), parse(siteParam, req.params).id));
  });

  r.get('/sites/:id/statement-trend', requireRole('readStatements'), async (req, res) => {
    res.json(await statements.trend(callerOf(req), parse(siteParam, req.params).id));
  });

  r.get('/sites/:id/statements/:month.csv', requireRole('readStatements'), async (req, res) => {
    const p = parse(params, req.params);
    const c = callerOf(req);
    const s = await statements.statement(c, p.id, p.month);
    await audit.record(c, 'statement-export', `site:${s.siteId}`, { month: s.month, format: 'csv' });
    res.type('text/csv; charset=utf-8; header=present').attachment(`statement-site-${s.siteId}-${s.month}.csv`).send(statementCsv(s));
  });

  r.get('/sites/:id/statements/:month', requireRole('readStatements'), async (req, res) => {
    const p = parse(params, req.params);
    res.json(await statements.statement(callerOf(req), p.id, p.month));
  });

  return r;
}
