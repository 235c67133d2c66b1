import { z } from 'zod';
import { ROLES } from '../../shared/contracts/api';
import { SERIAL_PATTERN, WIRE_RANGES } from '../../shared/contracts/wire-format';
import { MAX_PASSWORD_BYTES, utf8Bytes } from '../services/passwords';
import { num, timeZone } from './validation';

const email = z.email('Must be an e-mail address.').max(254);
const name = z.string().trim().min(1, 'Required.').max(120, 'At most 120 characters.');
// bcrypt ignores every byte past the 72nd, so a longer password would only seem to count in full.
const password = z
  .string({ error: 'Required.' })
  .min(10, 'At least 10 characters.')
  .refine(
    (s) => utf8Bytes(s) <= MAX_PASSWORD_BYTES,
    `At most ${MAX_PASSWORD_BYTES} bytes (UTF-8): fewer characters when they are accented or not Latin.`,
  );
const role = z.enum(ROLES, `Must be one of ${ROLES.join(', ')}.`);
const id = z.number().int().positive();

export const signInBody = z.strictObject({
  email: z.string().min(1, 'Required.').max(254),
  password: z.string().min(1, 'Required.').max(200),
});

export const createUserBody = z.strictObject({ email, name, role, ownerId: id.nullable().optional(), password });
export const updateUserBody = z.strictObject({
  name: name.optional(),
  role: role.optional(),
  ownerId: id.nullable().optional(),
  disabled: z.boolean().optional(),
});
export const passwordBody = z.strictObject({ password });
export const changePasswordBody = z.strictObject({
  currentPassword: z.string({ error: 'Required.' }).min(1, 'Required.').max(200),
  newPassword: password,
});

export const ownerBody = z.strictObject({ name, contactEmail: email.nullable().optional() });

export const siteBody = z.strictObject({
  ownerId: id,
  name,
  latitudeDeg: num(-90, 90, '°'),
  longitudeDeg: num(-180, 180, '°'),
  elevationM: num(-500, 9000, 'm'),
  timeZone,
  albedo: num(0, 1, '(fraction)'),
  indoor: z.boolean().optional(),
});

export const unitBody = z.strictObject({
  serial: z.string().regex(SERIAL_PATTERN, '3–32 capital letters, digits or dashes.'),
  siteId: id,
  ratedPowerWp: num(1, 100_000, 'Wp'),
  detectorTiltDeg: num(...WIRE_RANGES.detectorTiltDeg, '°'),
  tiltMinDeg: num(0, 90, '°'),
  tiltMaxDeg: num(0, 90, '°'),
  azimuthMinDeg: num(0, 360, '°'),
  azimuthMaxDeg: num(0, 360, '°'),
  planXM: num(-10_000, 10_000, 'm'),
  planYM: num(-10_000, 10_000, 'm'),
  firmware: z.string().trim().min(1, 'Required.').max(32),
  disabled: z.boolean().optional(),
  weatherStation: z.boolean().optional(),
});

export const unitListQuery = z.strictObject({ siteId: z.coerce.number().int().positive().optional() });
