import { createSecretKey, randomBytes, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import type { Me } from '../../shared/contracts/api';
import { AppError, badRequest, unauthorized } from '../errors/app-error';
import type { UserRepository } from '../data/user-repository';
import type { AuditRepository } from '../data/audit-repository';
import type { LiveSession, SessionRepository } from '../data/session-repository';
import type { SignInLimiter } from './sign-in-limiter';
import type { Passwords } from './passwords';
import type { SessionEvents } from './session-events';
import type { Caller } from './caller';

export interface AuthServiceOptions {
  secret: string;
  sessionHours: number;
  now?: () => number;
}

export interface AuthRepositories {
  users: UserRepository;
  sessions: SessionRepository;
  audit: AuditRepository;
}

/** A signed-in person and the session the request came with. */
export type SessionCaller = Caller & Me & { sessionId: string };

/** Ends sessions; what AdminService needs when it changes a user. */
export interface SessionRevoker {
  /** Ends every session of the user (but `exceptSessionId`), and closes the connections open on them. */
  endSessionsOf(userId: number, exceptSessionId?: string): Promise<void>;
}

const GENERIC = 'E-mail or password is wrong, or the account is disabled.';
const ENDED = 'Your session is invalid or has expired. Sign in again.';
const tooMany = () => new AppError(429, 'too_many_attempts', 'Too many failed attempts. Wait a minute and try again.');

/**
 * Folds an e-mail the way the users.email collation (utf8mb4_unicode_ci) compares it: case, accents and trailing
 * spaces do not count. Only used as a limiter key for addresses that match no account.
 */
export const foldEmail = (email: string): string => email.normalize('NFKD').replace(/\p{M}/gu, '').toLowerCase().trim();

export class AuthService implements SessionRevoker {
  private readonly now: () => number;
  /** The signing key as a key object: given a string, jsonwebtoken first tries (and fails) to read it as a public key on every call. */
  private readonly key: KeyObject;

  constructor(
    private readonly repo: AuthRepositories,
    private readonly limiter: SignInLimiter,
    private readonly passwords: Passwords,
    private readonly events: SessionEvents,
    private readonly opts: AuthServiceOptions,
  ) {
    this.now = opts.now ?? Date.now;
    this.key = createSecretKey(Buffer.from(opts.secret, 'utf8'));
  }

  /**
   * Checks credentials and opens a session. One generic message for every failure, and the same work (one bcrypt
   * compare) whether the account exists, is disabled or not. The attempt is counted against the client address and the
   * account before the password is checked; a success gives it back.
   */
  async signIn(email: string, password: string, address: string): Promise<{ me: Me; token: string }> {
    const addressKey = `address:${address}`;
    if (!(await this.limiter.take([addressKey]))) throw tooMany();
    // The database finds the account under any spelling its collation matches; the limit then counts by account id.
    const row = await this.repo.users.findByEmail(email);
    const accountKey = row ? `account:${row.id}` : `email:${foldEmail(email)}`;
    if (!(await this.limiter.take([accountKey]))) throw tooMany();
    const ok = await this.passwords.verify(password, row?.passwordHash);
    if (!row || row.disabled || !ok) {
      await this.repo.audit.append({
        userId: row?.id ?? null,
        action: 'sign-in-failed',
        target: email.toLowerCase().slice(0, 128),
        detail: { address },
      });
      throw new AppError(401, 'invalid_credentials', GENERIC);
    }
    await this.limiter.giveBack([addressKey, accountKey]);
    const now = new Date(this.now());
    await this.repo.sessions.deleteEnded(row.id, now);
    const sessionId = randomBytes(16).toString('hex');
    await this.repo.sessions.insert({ id: sessionId, userId: row.id, expiresAt: new Date(now.getTime() + this.sessionSeconds * 1000) });
    await this.repo.audit.append({ userId: row.id, action: 'sign-in', detail: { address } });
    const token = jwt.sign({ sub: String(row.id), sid: sessionId }, this.key, { expiresIn: this.sessionSeconds, algorithm: 'HS256' });
    return { me: toMe(row), token };
  }

  /** Resolves a session token to its open session and (still enabled) user; role and owner are read fresh. */
  async verify(token: string | undefined): Promise<SessionCaller> {
    const claims = this.claims(token);
    if (!claims) throw unauthorized(token ? ENDED : undefined);
    const [row] = await this.repo.sessions.findLive([claims.sid], new Date(this.now()));
    if (!row || row.id !== claims.sub || row.disabled) throw unauthorized(ENDED);
    return toSessionCaller(row);
  }

  /** The callers of those sessions that are still open, by session id (for connections that outlive a request). */
  async liveSessions(sessionIds: readonly string[]): Promise<Map<string, SessionCaller>> {
    const rows = sessionIds.length ? await this.repo.sessions.findLive(sessionIds, new Date(this.now())) : [];
    return new Map(rows.filter((r) => !r.disabled).map((r) => [r.sessionId, toSessionCaller(r)]));
  }

  /** Ends the session a token names, if it is a token of ours; anything else is already signed out. */
  async signOut(token: string | undefined, address: string): Promise<void> {
    const claims = this.claims(token);
    if (!claims) return;
    if (await this.repo.sessions.revoke(claims.sid, new Date(this.now()))) {
      await this.repo.audit.append({ userId: claims.sub, action: 'sign-out', detail: { address } });
    }
    this.events.emit({ sessionId: claims.sid });
  }

  /**
   * Changes the caller's own password after checking the current one (counted against the account like a sign-in);
   * every other session of the caller ends.
   */
  async changePassword(caller: SessionCaller, currentPassword: string, newPassword: string, address: string): Promise<void> {
    const accountKey = `account:${caller.id}`;
    if (!(await this.limiter.take([accountKey]))) throw tooMany();
    const row = await this.repo.users.findById(caller.id);
    if (!row || row.disabled) throw unauthorized(ENDED);
    if (!(await this.passwords.verify(currentPassword, row.passwordHash))) {
      await this.repo.audit.append({
        userId: caller.id,
        action: 'password-change-failed',
        target: `user:${caller.id}`,
        detail: { address },
      });
      throw badRequest('The current password is not right.', { currentPassword: 'That is not your current password.' });
    }
    await this.limiter.giveBack([accountKey]);
    if (newPassword === currentPassword)
      throw badRequest('The new password is the current one.', { newPassword: 'Choose a password different from the current one.' });
    await this.repo.users.update(caller.id, { passwordHash: await this.passwords.hash(newPassword) });
    await this.endSessionsOf(caller.id, caller.sessionId);
    await this.repo.audit.append({ userId: caller.id, action: 'password-change', target: `user:${caller.id}`, detail: { address } });
  }

  async endSessionsOf(userId: number, exceptSessionId?: string): Promise<void> {
    await this.repo.sessions.revokeForUser(userId, new Date(this.now()), exceptSessionId);
    this.events.emit(exceptSessionId ? { userId, exceptSessionId } : { userId });
  }

  get sessionSeconds(): number {
    return Math.round(this.opts.sessionHours * 3600);
  }

  /** The user and session a token of ours names, or null for anything else (missing, forged, expired, old format). */
  private claims(token: string | undefined): { sub: number; sid: string } | null {
    if (!token) return null;
    try {
      const p = jwt.verify(token, this.key, { algorithms: ['HS256'] });
      if (typeof p !== 'object' || typeof p.sid !== 'string' || !/^[0-9a-f]{32}$/.test(p.sid) || !/^[1-9]\d{0,9}$/.test(String(p.sub)))
        return null;
      return { sub: Number(p.sub), sid: p.sid };
    } catch {
      return null;
    }
  }
}

const toMe = (r: Pick<Me, 'id' | 'email' | 'name' | 'role' | 'ownerId'>): Me => ({
  id: r.id,
  email: r.email,
  name: r.name,
  role: r.role,
  ownerId: r.ownerId,
});

const toSessionCaller = (r: LiveSession): SessionCaller => ({ ...toMe(r), sessionId: r.sessionId });
