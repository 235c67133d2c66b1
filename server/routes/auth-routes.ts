import { Router, type CookieOptions, type Request } from 'express';
import type { AuthService } from '../services/auth-service';
import { SESSION_COOKIE, callerOf, requireSession, tokenOf } from './access';
import { changePasswordBody, signInBody } from './schemas';
import { parse } from './validation';

/**
 * Sessions travel in an httpOnly, SameSite=Strict cookie: scripts on the page cannot read it, other sites cannot send it,
 * and the browser sends it on the WebSocket upgrade too. It is marked Secure whenever the request came over HTTPS
 * (`req.secure`, which believes X-Forwarded-Proto only from a proxy named in BW_TRUST_PROXY).
 */
export function authRoutes(auth: AuthService): Router {
  const r = Router();
  const cookieOptions = (req: Request): CookieOptions => ({ httpOnly: true, sameSite: 'strict', secure: req.secure, path: '/' });
  const addressOf = (req: Request) => req.ip ?? 'unknown';

  r.post('/auth/sign-in', async (req, res) => {
    const body = parse(signInBody, req.body);
    const { me, token } = await auth.signIn(body.email, body.password, addressOf(req));
    res.cookie(SESSION_COOKIE, token, { ...cookieOptions(req), maxAge: auth.sessionSeconds * 1000 });
    res.json(me);
  });
  r.post('/auth/sign-out', async (req, res) => {
    await auth.signOut(tokenOf(req), addressOf(req));
    res.clearCookie(SESSION_COOKIE, cookieOptions(req));
    res.status(204).end();
  });
  r.get('/me', requireSession(auth), (req, res) => {
    const { id, email, name, role, ownerId } = callerOf(req);
    res.json({ id, email, name, role, ownerId });
  });
  r.post('/me/password', requireSession(auth), async (req, res) => {
    const body = parse(changePasswordBody, req.body);
    await auth.changePassword(callerOf(req), body.currentPassword, body.newPassword, addressOf(req));
    res.status(204).end();
  });
  return r;
}
