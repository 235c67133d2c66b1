import { Router } from 'express';
import type { AdminService } from '../services/admin-service';
import type { SiteModelService } from '../services/site-model-service';
import type { AuditRepository } from '../data/audit-repository';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

/** The site survey (what a site sees) — read by every role in scope, edited by admins and engineers. */
export function siteModelRoutes(admin: AdminService, model: SiteModelService, audit: AuditRepository): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;
  r.get('/sites/:id/survey', async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    res.json(await model.survey(site.id));
  });
  r.put('/sites/:id/survey', requireRole('admin', 'engineer'), async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    const saved = await model.saveSurvey(site.id, req.body);
    await audit.append({ userId: callerOf(req).id, action: 'site-survey-update', target: `site:${site.id}`, detail: { horizonPoints: saved.horizon.length, reflectors: saved.reflectors.length, lamps: saved.lamps.length } });
    res.json(saved);
  });
  return r;
}
