import { Router } from 'express';
import type { DemoHistoryStatus } from '../services/demo-history-status';
import { requireRole } from './access';

/**
 * The demo's generated past (admins). Mounted behind requireSession.
 *   GET /demo-history   progress of the fill: state, full-rate days done of planned, message
 */
export function demoHistoryRoutes(status: DemoHistoryStatus): Router {
  const r = Router();
  r.get('/demo-history', requireRole('readDemoHistory'), async (_req, res) => {
    res.json(await status.current());
  });
  return r;
}
