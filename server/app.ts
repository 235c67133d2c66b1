import express, { type Express } from 'express';
import cookieParser from 'cookie-parser';
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import type { Logger } from 'pino';
import type { Db } from './data/db';
import type { AuthService } from './services/auth-service';
import type { AdminService } from './services/admin-service';
import { apiNotFound, errorHandler } from './errors/error-handler';
import { authRoutes } from './routes/auth-routes';
import { adminRoutes } from './routes/admin-routes';
import { healthRoutes, type BrokerStatus } from './routes/health-routes';
import { requireSession } from './routes/access';

export interface AppDeps {
  db: Db;
  log: Logger;
  auth: AuthService;
  admin: AdminService;
  broker: () => BrokerStatus;
  version: string;
  /** Built dashboard to serve, with the single-page fallback; omitted in API-only tests. */
  webDir?: string;
  /** Whether session cookies carry `Secure` (set behind TLS). */
  secureCookie?: boolean;
  /** Extra authenticated API routers added by later features. */
  routers?: express.Router[];
}

/** Builds the HTTP app; never listens (tests use it in-process). */
export function createApp(deps: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(express.json({ limit: '256kb' }));
  app.use(cookieParser());

  const api = express.Router();
  api.use(healthRoutes(deps.db, deps.broker, deps.version));
  api.use(authRoutes(deps.auth, deps.secureCookie ?? false));
  api.use(requireSession(deps.auth));
  api.use(adminRoutes(deps.admin));
  for (const r of deps.routers ?? []) api.use(r);
  api.use(apiNotFound);
  app.use('/api', api);

  if (deps.webDir && existsSync(resolve(deps.webDir, 'index.html'))) {
    const dir = resolve(deps.webDir);
    app.use(express.static(dir, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => res.sendFile(resolve(dir, 'index.html'), { maxAge: 0 }));
  }
  app.use(errorHandler(deps.log));
  return app;
}
