import { Router } from 'express';
import { z } from 'zod';
import { HEALTH_SETTINGS_REASON_MAX } from '../../shared/contracts/alarms';
import { healthSettingsOverrideSchema } from '../health/health-settings';
import type { AdminService } from '../services/admin-service';
import type { AlarmService } from '../services/alarm-service';
import type { HealthReplay } from '../services/health-replay';
import type { HealthSettingsService } from '../services/health-settings-service';
import type { ScanService } from '../services/scan-service';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const listQuery = z.strictObject({
  siteId: z.coerce.number().int().positive('Must be a positive whole number.').optional(),
  unitId: z.coerce.number().int().positive('Must be a positive whole number.').optional(),
  state: z.enum(['active', 'cleared'], 'Must be active or cleared.').optional(),
  limit: z.coerce.number().int().min(1, 'Must be between 1 and 1000.').max(1000, 'Must be between 1 and 1000.').optional(),
});

/** A save: the overrides and, beside them, why they change (the settings' names never collide with `reason`). */
const settingsSave = healthSettingsOverrideSchema.safeExtend({
  reason: z
    .string({ error: 'Required: say why the settings change (it goes to the audit log).' })
    .trim()
    .min(1, 'Required: say why the settings change (it goes to the audit log).')
    .max(HEALTH_SETTINGS_REASON_MAX, `Must be at most ${HEALTH_SETTINGS_REASON_MAX} characters.`),
});

const historyQuery = z.strictObject({
  limit: z.coerce
    .number({ error: 'Must be between 1 and 200.' })
    .int('Must be between 1 and 200.')
    .min(1, 'Must be between 1 and 200.')
    .max(200, 'Must be between 1 and 200.')
    .default(50),
});

const scanQuery = z.strictObject({ commandId: z.string().min(1).max(64).optional() });

const runBody = z.strictObject({
  from: z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' }),
  to: z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' }),
  unitIds: z.array(z.number().int().positive()).min(1).max(500).optional(),
});

export interface AlarmRouteDeps {
  admin: AdminService;
  alarms: AlarmService;
  settings: HealthSettingsService;
  scans: ScanService;
  replay: HealthReplay;
}

/**
 * Health alarms, scan results, per-site health settings and on-demand runs. Mounted behind requireSession; owners see only
 * their own sites' alarms (404 otherwise, as for units and sites).
 *   GET  /alarms?siteId&unitId&state&limit     newest first
 *   GET  /alarms/:id
 *   POST /alarms/:id/acknowledge               technician, engineer, admin
 *   GET  /units/:id/scans/latest[?commandId]   the unit's scan rebuilt: measured maximum, local maxima, model, goto offer
 *   GET  /sites/:id/health-settings            defaults, the site's overrides, effective values
 *   PUT  /sites/:id/health-settings            engineer, admin: replaces the site's overrides; `reason` required
 *   GET  /sites/:id/health-settings/history    technician, engineer, admin: the saved changes from the audit log
 *   POST /detectors/run { from, to, unitIds? } engineer, technician, admin: the alarms the detectors raise over stored data
 *   POST /health/run                           the old name of /detectors/run: 308 there (`/api/health` is the liveness check)
 */
export function alarmRoutes(d: AlarmRouteDeps): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;

  r.get('/alarms', async (req, res) => {
    res.json(await d.alarms.list(callerOf(req), parse(listQuery, req.query)));
  });

  r.get('/alarms/:id', async (req, res) => {
    res.json(await d.alarms.get(callerOf(req), id(req.params)));
  });

  r.post('/alarms/:id/acknowledge', requireRole('acknowledgeAlarms'), async (req, res) => {
    res.json(await d.alarms.acknowledge(callerOf(req), id(req.params)));
  });

  r.get('/units/:id/scans/latest', async (req, res) => {
    res.json(await d.scans.scanResult(callerOf(req), id(req.params), parse(scanQuery, req.query).commandId));
  });

  r.get('/sites/:id/health-settings', async (req, res) => {
    res.json(await d.settings.siteSettings(callerOf(req), id(req.params)));
  });

  r.put('/sites/:id/health-settings', requireRole('editHealthSettings'), async (req, res) => {
    const siteId = id(req.params);
    await d.admin.getSite(callerOf(req), siteId); // an unknown site is a 404 before its body is judged
    const { reason, ...overrides } = parse(settingsSave, req.body, 'The health settings');
    res.json(await d.settings.saveSiteSettings(callerOf(req), siteId, overrides, reason));
  });

  r.get('/sites/:id/health-settings/history', requireRole('readHealthSettings'), async (req, res) => {
    const siteId = id(req.params);
    res.json(await d.settings.history(callerOf(req), siteId, parse(historyQuery, req.query).limit));
  });

  r.post('/detectors/run', requireRole('runDetectors'), async (req, res) => {
    res.json(await d.replay.runRange(callerOf(req), parse(runBody, req.body)));
  });

  // The route's old name, beside the liveness check `/api/health` it had nothing to do with: a permanent redirect that
  // keeps the method and body, so older scripts go on working (the new route checks the role).
  r.post('/health/run', (_req, res) => {
    res.redirect(308, '/api/detectors/run');
  });
  return r;
}
