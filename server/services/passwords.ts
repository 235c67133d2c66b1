import { randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { badRequest } from '../errors/app-error';

/** bcrypt reads at most this many bytes of a password and silently ignores the rest. */
export const MAX_PASSWORD_BYTES = 72;

export const utf8Bytes = (s: string): number => Buffer.byteLength(s, 'utf8');

/**
 * Hashing and checking passwords with bcrypt at one cost. `verify` without a hash (unknown account) still runs one
 * compare, against a dummy hash of the same cost, so the answer takes as long whether or not the account exists.
 */
export class Passwords {
  private dummy: Promise<string> | undefined;

  constructor(private readonly cost: number) {}

  async hash(password: string): Promise<string> {
    // Routes refuse these with a field error first; this keeps any other caller from storing a hash that ignores bytes.
    if (utf8Bytes(password) > MAX_PASSWORD_BYTES) throw badRequest(`A password may have at most ${MAX_PASSWORD_BYTES} bytes (UTF-8).`);
    return bcrypt.hash(password, this.cost);
  }

  async verify(password: string, hash: string | undefined): Promise<boolean> {
    this.dummy ??= bcrypt.hash(randomBytes(18).toString('base64'), this.cost);
    const ok = await bcrypt.compare(password, hash ?? (await this.dummy));
    return hash !== undefined && ok;
  }
}
