import { Router, type RequestHandler } from 'express';
import { z } from 'zod';
import { notFound } from '../errors/app-error';
import type { SurveyRevisionService } from '../services/survey-revision-service';
import { callerOf, requireRole } from './access';
import { parse } from './validation';

const siteParam = z.strictObject({ id: z.coerce.number().int().positive('Must be a positive whole number.') });
const revisionParams = z.strictObject({
  id: z.coerce.number().int().positive('Must be a positive whole number.'),
  revisionId: z.coerce.number().int().positive('Must be a positive whole number.'),
});
const proposeBody = z.strictObject({
  days: z
    .number({ error: 'Must be a number of days from 1 to 90.' })
    .int('Must be a whole number of days.')
    .min(1, 'Must be from 1 to 90 days.')
    .max(90, 'Must be from 1 to 90 days.')
    .default(30),
});
const decideBody = z.strictObject({
  reason: z
    .string({ error: 'Say why (3 to 500 characters).' })
    .trim()
    .min(3, 'Say why (at least 3 characters).')
    .max(500, 'At most 500 characters.'),
});

/** Owners never see survey revisions, not even of their own sites (404, so nothing about them leaks). */
const notForOwners: RequestHandler = (req, _res, next) => {
  if (callerOf(req).role === 'owner') throw notFound('Survey revision');
  next();
};

/**
 * Survey revisions of a site (corrections fitted to its units' scans), never applied without a decision:
 *   GET  /sites/:id/survey-revisions                          newest first (admins, engineers, technicians)
 *   GET  /sites/:id/survey-revisions/:revisionId              one
 *   POST /sites/:id/survey-revisions/propose                  { days? }: fit the last `days` (30) of scans; 422 with too few
 *   POST /sites/:id/survey-revisions/:revisionId/accept       { reason }: becomes the site's survey (engineers, admins)
 *   POST /sites/:id/survey-revisions/:revisionId/reject       { reason }
 * Owners get 404, field crews 403.
 */
export function surveyRevisionRoutes(revisions: SurveyRevisionService): Router {
  const r = Router();
  const read = [notForOwners, requireRole('readSurveyRevisions')];
  const decide = [notForOwners, requireRole('editSurvey')];

  r.get('/sites/:id/survey-revisions', ...read, async (req, res) => {
    res.json(await revisions.list(callerOf(req), parse(siteParam, req.params).id));
  });
  r.get('/sites/:id/survey-revisions/:revisionId', ...read, async (req, res) => {
    const p = parse(revisionParams, req.params);
    res.json(await revisions.get(callerOf(req), p.id, p.revisionId));
  });
  r.post('/sites/:id/survey-revisions/propose', ...decide, async (req, res) => {
    const id = parse(siteParam, req.params).id;
    const body = parse(proposeBody, req.body ?? {});
    res.status(201).json(await revisions.propose(callerOf(req), id, body.days));
  });
  r.post('/sites/:id/survey-revisions/:revisionId/accept', ...decide, async (req, res) => {
    const p = parse(revisionParams, req.params);
    res.json(await revisions.accept(callerOf(req), p.id, p.revisionId, parse(decideBody, req.body).reason));
  });
  r.post('/sites/:id/survey-revisions/:revisionId/reject', ...decide, async (req, res) => {
    const p = parse(revisionParams, req.params);
    res.json(await revisions.reject(callerOf(req), p.id, p.revisionId, parse(decideBody, req.body).reason));
  });
  return r;
}
