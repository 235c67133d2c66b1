import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { Role } from '../../shared/contracts/api';
import { forbidden } from '../errors/app-error';
import type { AuthService } from '../services/auth-service';
import type { Caller } from '../services/caller';

export const SESSION_COOKIE = 'bw_session';

declare module 'express-serve-static-core' {
  interface Request {
    caller?: Caller & { name: string; email: string };
  }
}

/** Resolves the session cookie (or an `Authorization: Bearer` token, for scripts) to `req.caller`; 401 otherwise. */
export function requireSession(auth: AuthService): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const header = req.headers.authorization;
    const bearer = header?.startsWith('Bearer ') ? header.slice(7) : undefined;
    req.caller = await auth.verify(req.cookies?.[SESSION_COOKIE] ?? bearer);
    next();
  };
}

export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.caller || !roles.includes(req.caller.role)) throw forbidden();
    next();
  };
}

/** The caller of a request that passed `requireSession`. */
export const callerOf = (req: Request) => req.caller!;
