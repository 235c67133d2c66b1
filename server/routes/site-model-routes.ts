import { Router } from 'express';
import type { SiteSurvey } from '../../shared/contracts/survey';
import type { AdminService } from '../services/admin-service';
import type { SiteModelService } from '../services/site-model-service';
import { validationError } from '../errors/validation-error';
import { callerOf, requireRole } from './access';
import { surveySchema } from '../../shared/contracts/survey';
import { surveyFieldWords } from '../../shared/contracts/plain-words';
import { idParam, parse } from './validation';

/** The site survey (what a site sees) — read by every role in scope, edited by admins and engineers. */
export function siteModelRoutes(admin: AdminService, model: SiteModelService): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;
  r.get('/sites/:id/survey', async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    res.json(await model.survey(site.id));
  });
  r.put('/sites/:id/survey', requireRole('editSurvey'), async (req, res) => {
    const site = await admin.getSite(callerOf(req), id(req.params));
    // The body as sent (no empty-object default): a missing survey is named as such.
    const body = surveySchema.safeParse(req.body);
    if (!body.success) throw validationError(body.error, 'The survey', surveyFieldWords);
    res.json(await model.saveSurvey(callerOf(req), site.id, body.data as SiteSurvey));
  });
  return r;
}
