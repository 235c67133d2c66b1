import { Router } from 'express';
import { z } from 'zod';
import { WIRE_RANGES } from '../../shared/contracts/wire-format';
import { DETECTOR_TILT_MARGIN_DEG } from '../../shared/landscape/detector-tilt';
import type { AdminService } from '../services/admin-service';
import type { DetectorTiltService } from '../services/detector-tilt-service';
import { callerOf, requireRole } from './access';
import { idParam, num, parse } from './validation';

const [TILT_MIN, TILT_MAX] = WIRE_RANGES.detectorTiltDeg;

const recommendQuery = z.strictObject({
  year: z.coerce
    .number({ error: 'Must be a year between 2000 and 2100.' })
    .int('Must be a year between 2000 and 2100.')
    .min(2000, 'Must be a year between 2000 and 2100.')
    .max(2100, 'Must be a year between 2000 and 2100.')
    .optional(),
  marginDeg: z.coerce
    .number({ error: 'Must be between 0 and 10 °.' })
    .min(0, 'Must be between 0 and 10 °.')
    .max(10, 'Must be between 0 and 10 °.')
    .default(DETECTOR_TILT_MARGIN_DEG),
});

const applyBody = z.strictObject({
  detectorTiltDeg: num(TILT_MIN, TILT_MAX, '°'),
  confirm: z.literal(true, 'Must be true: the new detector tilt changes how every unit of the site seeks and moves.'),
});

/**
 * The detector tilt a site needs, and sending it to all its units (engineers and admins). Mounted behind requireSession.
 *   GET  /sites/:id/detector-tilt?year&marginDeg     the year's worst day's single-peak detector tilt plus a margin
 *   POST /sites/:id/detector-tilt { detectorTiltDeg, confirm: true }   one audited configure command per enabled unit
 */
export function detectorTiltRoutes(admin: AdminService, tilts: DetectorTiltService, now: () => number = Date.now): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;
  const tune = requireRole('tuneDetectors');

  r.get('/sites/:id/detector-tilt', tune, async (req, res) => {
    const siteId = id(req.params);
    const q = parse(recommendQuery, req.query);
    res.json(await tilts.recommend(callerOf(req), siteId, { year: q.year ?? new Date(now()).getUTCFullYear(), marginDeg: q.marginDeg }));
  });

  r.post('/sites/:id/detector-tilt', tune, async (req, res) => {
    const siteId = id(req.params);
    await admin.getSite(callerOf(req), siteId); // an unknown site is a 404 before its body is judged
    const body = parse(applyBody, req.body, 'The detector tilt');
    res.json(await tilts.apply(callerOf(req), siteId, body.detectorTiltDeg));
  });
  return r;
}
