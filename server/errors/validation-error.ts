import type { z } from 'zod';
import { badRequest, type AppError } from './app-error';

/**
 * Turns zod issues into a 400 naming every bad field (unknown fields included). `fields` stays keyed by path for
 * programs; the message names the fields for people, by `fieldName` when given (e.g. "Facade 1, reflectance" for
 * `reflectors.0.reflectance`), else by path.
 */
export function validationError(error: z.ZodError, what = 'The request', fieldName: (path: string) => string = (p) => p): AppError {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const k of issue.keys) fields[[...issue.path, k].join('.')] = 'Unknown field.';
      continue;
    }
    fields[issue.path.join('.') || '(body)'] ??= issue.message;
  }
  const paths = Object.keys(fields);
  const names = paths.map((p) => (p === '(body)' ? p : fieldName(p)));
  return badRequest(`${what} has ${paths.length} invalid field(s): ${names.join('; ')}.`, fields);
}
