import { Router } from 'express';
import type { AdminService } from '../services/admin-service';
import { callerOf, requireRole } from './access';
import { createUserBody, ownerBody, passwordBody, siteBody, unitBody, unitListQuery, updateUserBody } from './schemas';
import { idParam, parse } from './validation';

/** People and owners (admin only); sites and units (read: every role, scoped; write: admin). Mounted behind requireSession. */
export function adminRoutes(svc: AdminService): Router {
  const r = Router();
  const admin = requireRole('administer');
  const id = (params: unknown) => parse(idParam, params).id;

  r.get('/users', admin, async (_req, res) => {
    res.json(await svc.listUsers());
  });
  r.post('/users', admin, async (req, res) => {
    res.status(201).json(await svc.createUser(callerOf(req), parse(createUserBody, req.body)));
  });
  r.patch('/users/:id', admin, async (req, res) => {
    res.json(await svc.updateUser(callerOf(req), id(req.params), parse(updateUserBody, req.body)));
  });
  r.post('/users/:id/password', admin, async (req, res) => {
    await svc.resetPassword(callerOf(req), id(req.params), parse(passwordBody, req.body).password);
    res.status(204).end();
  });

  r.get('/owners', admin, async (_req, res) => {
    res.json(await svc.listOwners());
  });
  r.post('/owners', admin, async (req, res) => {
    res.status(201).json(await svc.createOwner(callerOf(req), parse(ownerBody, req.body)));
  });
  r.patch('/owners/:id', admin, async (req, res) => {
    res.json(await svc.updateOwner(callerOf(req), id(req.params), parse(ownerBody.partial(), req.body)));
  });

  r.get('/sites', async (req, res) => {
    res.json(await svc.listSites(callerOf(req)));
  });
  r.get('/sites/:id', async (req, res) => {
    res.json(await svc.getSite(callerOf(req), id(req.params)));
  });
  r.post('/sites', admin, async (req, res) => {
    res.status(201).json(await svc.createSite(callerOf(req), parse(siteBody, req.body)));
  });
  r.patch('/sites/:id', admin, async (req, res) => {
    res.json(await svc.updateSite(callerOf(req), id(req.params), parse(siteBody.partial(), req.body)));
  });

  r.get('/units', async (req, res) => {
    res.json(await svc.listUnits(callerOf(req), parse(unitListQuery, req.query).siteId));
  });
  r.get('/units/:id', async (req, res) => {
    res.json(await svc.getUnit(callerOf(req), id(req.params)));
  });
  r.post('/units', admin, async (req, res) => {
    res.status(201).json(await svc.createUnit(callerOf(req), parse(unitBody, req.body)));
  });
  r.patch('/units/:id', admin, async (req, res) => {
    res.json(await svc.updateUnit(callerOf(req), id(req.params), parse(unitBody.partial(), req.body)));
  });
  r.post('/units/:id/secret', admin, async (req, res) => {
    res.json(await svc.rotateDeviceSecret(callerOf(req), id(req.params)));
  });
  return r;
}
