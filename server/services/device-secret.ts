import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import bcrypt from 'bcryptjs';

/**
 * MQTT device secrets: 32 random bytes, shown once. Stored as SHA-256 — a slow password hash is not needed for a
 * high-entropy secret, and the broker checks it on every connect of thousands of units.
 */
export const newDeviceSecret = (): string => randomBytes(32).toString('base64url');

export const hashDeviceSecret = (secret: string): string => 'sha256:' + createHash('sha256').update(secret).digest('hex');

/**
 * The same secret as the external message engine checks it (NATS takes bcrypt, not SHA-256). The lowest cost: the
 * secret is 32 random bytes, so the hash only has to be one the engine accepts, and it is checked on every connect.
 */
export const engineSecretHash = (secret: string): string => bcrypt.hashSync(secret, 4);

export function deviceSecretMatches(secret: string, stored: string): boolean {
  const a = Buffer.from(hashDeviceSecret(secret));
  const b = Buffer.from(stored);
  return a.length === b.length && timingSafeEqual(a, b);
}
