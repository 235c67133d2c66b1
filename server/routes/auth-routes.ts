import { Router } from 'express';
import type { AuthService } from '../services/auth-service';
import { SESSION_COOKIE, callerOf, requireSession } from './access';
import { signInBody } from './schemas';
import { parse } from './validation';

/** Sessions travel in an httpOnly, SameSite=Strict cookie: scripts on the page cannot read it, other sites cannot send it,
 * and the browser sends it on the WebSocket upgrade too. */
export function authRoutes(auth: AuthService, secureCookie: boolean): Router {
  const r = Router();
  r.post('/auth/sign-in', async (req, res) => {
    const body = parse(signInBody, req.body);
    const { me, token } = await auth.signIn(body.email, body.password, req.ip ?? 'unknown');
    res.cookie(SESSION_COOKIE, token, { httpOnly: true, sameSite: 'strict', secure: secureCookie, path: '/', maxAge: auth.sessionSeconds * 1000 });
    res.json(me);
  });
  r.post('/auth/sign-out', (_req, res) => {
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });
  r.get('/me', requireSession(auth), (req, res) => {
    const { id, email, name, role, ownerId } = callerOf(req);
    res.json({ id, email, name, role, ownerId });
  });
  return r;
}
