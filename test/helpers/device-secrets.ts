import { createHash } from 'node:crypto';

/** Device secrets of the demo units in test databases: derived from the serial so tests can connect. Tests only —
 * the real demo seed gives every unit a random secret. */
export const testDeviceSecret = (serial: string): string =>
  createHash('sha256').update(`brightward-test-device:${serial}`).digest('base64url').slice(0, 32);
