import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { PERMISSIONS, type Permission } from '../../shared/contracts/permissions';
import { forbidden } from '../errors/app-error';
import type { AuthService, SessionCaller } from '../services/auth-service';

export const SESSION_COOKIE = 'bw_session';

declare module 'express-serve-static-core' {
  interface Request {
    caller?: SessionCaller;
  }
}

/** The session token of a request: the session cookie, or an `Authorization: Bearer` token (scripts). */
export function tokenOf(req: Request): string | undefined {
  const cookie: unknown = req.cookies?.[SESSION_COOKIE];
  if (typeof cookie === 'string' && cookie) return cookie;
  const header = req.headers.authorization;
  return header?.startsWith('Bearer ') ? header.slice(7).trim() || undefined : undefined;
}

/** Resolves the session token to `req.caller` (an open session of an enabled user); 401 otherwise. */
export function requireSession(auth: AuthService): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    req.caller = await auth.verify(tokenOf(req));
    next();
  };
}

/** Lets through callers whose role holds the permission (the table in shared/contracts/permissions.ts); 403 otherwise. */
export function requireRole(permission: Permission): RequestHandler {
  const roles: readonly string[] = PERMISSIONS[permission];
  return (req, _res, next) => {
    if (!req.caller || !roles.includes(req.caller.role)) throw forbidden();
    next();
  };
}

/** The caller of a request that passed `requireSession`. */
export const callerOf = (req: Request) => req.caller!;
