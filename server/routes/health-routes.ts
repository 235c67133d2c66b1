import { Router } from 'express';
import type { Health } from '../../shared/contracts/api';
import type { Db } from '../data/db';

export interface BrokerStatus {
  ok: boolean;
  port: number | null;
  clients: number;
}

/** `GET /api/health`: answers without a session so supervisors can poll it; 503 when the database is down. */
export function healthRoutes(db: Db, broker: () => BrokerStatus, version: string): Router {
  const r = Router();
  r.get('/health', async (_req, res) => {
    let database: Health['database'];
    try {
      await db.raw('SELECT 1');
      database = { ok: true };
    } catch (err) {
      database = { ok: false, error: (err as Error).message };
    }
    const b = broker();
    const body: Health = { status: database.ok && b.ok ? 'ok' : 'degraded', version, database, broker: b };
    res.status(database.ok ? 200 : 503).json(body);
  });
  return r;
}
