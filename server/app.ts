import express, { type Express } from 'express';
import cookieParser from 'cookie-parser';
import helmet from 'helmet';
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import type { Logger } from 'pino';
import type { AuthService } from './services/auth-service';
import type { AdminService } from './services/admin-service';
import { apiNotFound, errorHandler } from './errors/error-handler';
import { authRoutes } from './routes/auth-routes';
import { adminRoutes } from './routes/admin-routes';
import { healthRoutes, type BrokerStatus } from './routes/health-routes';
import { requireSession } from './routes/access';
import { originCheck } from './routes/origin-check';
import type { TrustProxy } from './config';

export interface AppDeps {
  log: Logger;
  auth: AuthService;
  admin: AdminService;
  /** Resolves when the database answers (public health). */
  pingDatabase: () => Promise<void>;
  broker: () => BrokerStatus;
  /** Built dashboard to serve, with the single-page fallback; omitted in API-only tests. */
  webDir?: string;
  /** Proxies whose X-Forwarded-For/-Proto are believed (BW_TRUST_PROXY); none by default. */
  trustProxy?: TrustProxy;
  /** Origins besides the request's own host that may send state-changing requests (BW_ALLOWED_ORIGINS). */
  allowedOrigins?: ReadonlySet<string>;
  /** Extra authenticated API routers added by later features. */
  routers?: express.Router[];
}

/**
 * What the built dashboard needs and nothing more: its own scripts only (no inline script or handler), its own
 * styles plus the inline styles Angular and the chart library set, its own fonts and images (and data: images from
 * the stylesheets), and requests (HTTP and WebSocket) to its own origin. Nobody may frame it.
 */
const CSP_DIRECTIVES = {
  'default-src': ["'self'"],
  'base-uri': ["'self'"],
  'script-src': ["'self'"],
  'script-src-attr': ["'none'"],
  'style-src': ["'self'", "'unsafe-inline'"],
  'img-src': ["'self'", 'data:'],
  'font-src': ["'self'"],
  'connect-src': ["'self'"],
  'object-src': ["'none'"],
  'frame-ancestors': ["'none'"],
  'form-action': ["'self'"],
};

/** Builds the HTTP app; never listens (tests use it in-process). */
export function createApp(deps: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', deps.trustProxy ?? false);
  app.use(helmet({ contentSecurityPolicy: { useDefaults: false, directives: CSP_DIRECTIVES }, xFrameOptions: { action: 'deny' } }));
  app.use(originCheck(deps.allowedOrigins ?? new Set()));
  app.use(express.json({ limit: '256kb' }));
  app.use(cookieParser());

  const api = express.Router();
  api.use(healthRoutes(deps.pingDatabase, deps.broker, deps.log));
  api.use(authRoutes(deps.auth));
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
