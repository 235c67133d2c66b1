import { Router } from 'express';
import { z } from 'zod';
import type { AdminService } from '../services/admin-service';
import type { LandscapeService } from '../services/landscape-service';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const landscapeQuery = z.strictObject({
  at: z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' }).optional(),
  detectorTiltDeg: z.coerce.number().min(0, 'Must be between 0 and 45 °.').max(45, 'Must be between 0 and 45 °.').default(10),
  stepDeg: z.coerce.number().min(1, 'Must be between 1 and 10 °.').max(10, 'Must be between 1 and 10 °.').default(2),
  grid: z.enum(['true', 'false'], 'Must be true or false.').default('true'),
});
const dayQuery = z.strictObject({ date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Must be a date YYYY-MM-DD.') });

/** The modelled irradiance landscape of a site (every role that may see the site; the engine runs on the server). */
export function landscapeRoutes(admin: AdminService, landscapes: LandscapeService): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;
  const staff = requireRole('readLandscape');

  r.get('/sites/:id/landscape', staff, async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    const q = parse(landscapeQuery, req.query);
    const at = q.at ? Date.parse(q.at) : Date.now();
    res.json(await landscapes.landscape(site, at, { stepDeg: q.stepDeg, detectorTiltDeg: q.detectorTiltDeg, grid: q.grid === 'true' }));
  });

  /** The modelled best in-plane irradiance now (or at `at`): what a unit at the global maximum would see. */
  r.get('/sites/:id/landscape/best', async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    const q = parse(z.strictObject({ at: landscapeQuery.shape.at }), req.query);
    const at = q.at ? Date.parse(q.at) : Date.now();
    res.json({ siteId: site.id, at: new Date(at).toISOString(), wm2: await landscapes.bestWm2(site.id, at) });
  });

  r.get('/sites/:id/landscape/day', staff, async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    const q = parse(dayQuery, req.query);
    res.json(await landscapes.day(site, q.date));
  });
  return r;
}
