import { Router } from 'express';
import { z } from 'zod';
import { MAX_CSV_DAYS } from '../../shared/contracts/traces';
import type { AdminService } from '../services/admin-service';
import type { AuditService } from '../services/audit-service';
import { checkRange, MAX_TRACE_DAYS, type TraceService } from '../services/trace-service';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const iso = z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' });
const tracesQuery = z.strictObject({
  from: iso,
  to: iso,
  points: z.coerce
    .number()
    .int('Must be a whole number.')
    .min(10, 'Must be between 10 and 5000.')
    .max(5000, 'Must be between 10 and 5000.')
    .default(2000),
});
const csvQuery = z.strictObject({ from: iso, to: iso });

/** Traces of one unit for engineers: downsampled on the server (min/max per bucket), and raw CSV export (audited). */
export function traceRoutes(admin: AdminService, traces: TraceService, audit: AuditService): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;
  const readers = requireRole('readTraces');

  r.get('/units/:id/traces', readers, async (req, res) => {
    const unit = await admin.getUnit(callerOf(req), id(req.params));
    const q = parse(tracesQuery, req.query);
    const { from, to } = checkRange(q.from, q.to, MAX_TRACE_DAYS);
    res.json(await traces.traces(unit, from, to, q.points));
  });

  r.get('/units/:id/traces.csv', readers, async (req, res) => {
    const unit = await admin.getUnit(callerOf(req), id(req.params));
    const q = parse(csvQuery, req.query);
    const { from, to } = checkRange(q.from, q.to, MAX_CSV_DAYS);
    // Recorded before the first byte: an export the log cannot record is not made.
    await audit.record(callerOf(req), 'trace-export', `unit:${unit.id}`, {
      serial: unit.serial,
      from: from.toISOString(),
      to: to.toISOString(),
    });
    const stamp = (d: Date) =>
      d
        .toISOString()
        .replace(/[:]/g, '')
        .replace(/\.\d{3}/, '');
    res.setHeader('Content-Type', 'text/csv; charset=utf-8; header=present');
    res.setHeader('Content-Disposition', `attachment; filename="${unit.serial}_${stamp(from)}_${stamp(to)}.csv"`);
    for await (const chunk of traces.csv(unit, from, to)) {
      if (!res.write(chunk)) await new Promise((ok) => res.once('drain', ok));
    }
    res.end();
  });
  return r;
}
