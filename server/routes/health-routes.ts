import { Router } from 'express';
import type { Logger } from 'pino';
import type { Health } from '../../shared/contracts/api';

export interface BrokerStatus {
  ok: boolean;
  port: number | null;
  clients: number;
}

/**
 * `GET /api/health`: answers without a session so supervisors can poll it; 503 when the database is down. Anyone may
 * ask, so it says only ok or not: the reason goes to the server log, once per change of state.
 */
export function healthRoutes(pingDatabase: () => Promise<void>, broker: () => BrokerStatus, log: Logger): Router {
  const r = Router();
  let lastProblem: string | null = null;
  r.get('/health', async (_req, res) => {
    let problem: string | null = null;
    try {
      await pingDatabase();
    } catch (err) {
      problem = (err as Error)?.message ?? String(err);
    }
    if (problem !== lastProblem) {
      if (problem) log.warn({ problem }, 'health: database unavailable');
      else log.info('health: database available again');
      lastProblem = problem;
    }
    const b = broker();
    const body: Health = { status: !problem && b.ok ? 'ok' : 'degraded', database: { ok: !problem }, broker: { ok: b.ok } };
    res.status(problem ? 503 : 200).json(body);
  });
  return r;
}
