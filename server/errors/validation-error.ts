import type { z } from 'zod';
import { badRequest, type AppError } from './app-error';

/** Turns zod issues into a 400 naming every bad field (unknown fields included). */
export function validationError(error: z.ZodError, what = 'The request'): AppError {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const k of issue.keys) fields[[...issue.path, k].join('.')] = 'Unknown field.';
      continue;
    }
    fields[issue.path.join('.') || '(body)'] ??= issue.message;
  }
  return badRequest(`${what} has ${Object.keys(fields).length} invalid field(s): ${Object.keys(fields).join(', ')}.`, fields);
}
