import { z } from 'zod';
import { validationError } from '../errors/validation-error';

/** Parses a body or query with a zod schema; a failure becomes a 400 that names every bad field (`what` names the whole). */
export function parse<T extends z.ZodType>(schema: T, value: unknown, what?: string): z.infer<T> {
  const r = schema.safeParse(value ?? {});
  if (r.success) return r.data;
  throw validationError(r.error, what);
}

export const idParam = z.strictObject({ id: z.coerce.number().int().positive('Must be a positive whole number.') });

const zones = new Set([...Intl.supportedValuesOf('timeZone'), 'UTC']);
export const timeZone = z.string().refine((z) => zones.has(z), 'Must be an IANA time zone such as Europe/Berlin.');

export const num = (min: number, max: number, unit: string) =>
  z
    .number({ error: `Must be a number (${unit}).` })
    .min(min, `Must be between ${min} and ${max} ${unit}.`)
    .max(max, `Must be between ${min} and ${max} ${unit}.`);
