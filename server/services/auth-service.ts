import bcrypt from 'bcryptjs';
import jwt from 'jsonwebtoken';
import type { Me } from '../../shared/contracts/api';
import { AppError, unauthorized } from '../errors/app-error';
import type { UserRepository } from '../data/user-repository';
import type { AuditRepository } from '../data/audit-repository';
import type { SignInLimiter } from './sign-in-limiter';
import type { Caller } from './caller';

export interface AuthServiceOptions {
  secret: string;
  sessionHours: number;
}

const GENERIC = 'E-mail or password is wrong, or the account is disabled.';

export class AuthService {
  constructor(
    private readonly users: UserRepository,
    private readonly audit: AuditRepository,
    private readonly limiter: SignInLimiter,
    private readonly opts: AuthServiceOptions,
  ) {}

  /** Checks credentials and returns the user and a signed session token. One generic message for every failure. */
  async signIn(email: string, password: string, address: string): Promise<{ me: Me; token: string }> {
    const keys = [`account:${email.toLowerCase()}`, `address:${address}`];
    if (this.limiter.isBlocked(keys)) {
      throw new AppError(429, 'too_many_attempts', 'Too many failed sign-ins. Wait a minute and try again.');
    }
    const row = await this.users.findByEmail(email.toLowerCase());
    const ok = row && !row.disabled && (await bcrypt.compare(password, row.password_hash));
    if (!row || !ok) {
      this.limiter.recordFailure(keys);
      await this.audit.append({ userId: row?.id ?? null, action: 'sign-in-failed', target: email.toLowerCase(), detail: { address } });
      throw new AppError(401, 'invalid_credentials', GENERIC);
    }
    await this.audit.append({ userId: row.id, action: 'sign-in', detail: { address } });
    const token = jwt.sign({ sub: String(row.id) }, this.opts.secret, { expiresIn: Math.round(this.opts.sessionHours * 3600), algorithm: 'HS256' });
    return { me: toMe(row), token };
  }

  /** Resolves a session token to its (still enabled) user; role and owner are read fresh, so changes apply at once. */
  async verify(token: string | undefined): Promise<Caller & Me> {
    if (!token) throw unauthorized();
    let sub: string;
    try {
      sub = String((jwt.verify(token, this.opts.secret, { algorithms: ['HS256'] }) as jwt.JwtPayload).sub);
    } catch {
      throw unauthorized('Your session is invalid or has expired. Sign in again.');
    }
    const row = await this.users.findById(Number(sub));
    if (!row || row.disabled) throw unauthorized('Your session is invalid or has expired. Sign in again.');
    return toMe(row);
  }

  get sessionSeconds(): number {
    return Math.round(this.opts.sessionHours * 3600);
  }
}

const toMe = (r: { id: number; email: string; name: string; role: Me['role']; owner_id: number | null }): Me => ({
  id: r.id,
  email: r.email,
  name: r.name,
  role: r.role,
  ownerId: r.owner_id,
});
