import { HttpErrorResponse } from '@angular/common/http';
import { AbstractControl, FormGroup } from '@angular/forms';
import type { ApiErrorBody } from '../../../shared/contracts/api';

/** What the dashboard needs to know about a failed request. */
export interface ApiProblem {
  /** HTTP status; 0 when the server could not be reached. */
  status: number;
  /** Machine code from the server (`validation_failed`, `invalid_credentials`, ...) or one of ours. */
  code: string;
  /** A sentence for people. */
  message: string;
  /** Field path → message, for 400 `validation_failed`. */
  fields: Record<string, string>;
}

function isApiErrorBody(body: unknown): body is ApiErrorBody {
  const error = (body as ApiErrorBody | null)?.error;
  return typeof error === 'object' && error !== null && typeof error.message === 'string';
}

/** Reads any error thrown by HttpClient (or anything else) into an {@link ApiProblem}. */
export function toApiProblem(error: unknown): ApiProblem {
  if (error instanceof HttpErrorResponse) {
    if (isApiErrorBody(error.error)) {
      const body = error.error.error;
      return { status: error.status, code: body.code, message: body.message, fields: body.fields ?? {} };
    }
    if (error.status === 0) {
      return {
        status: 0,
        code: 'unreachable',
        message: 'The Brightward server cannot be reached. Check the connection and try again.',
        fields: {},
      };
    }
    return {
      status: error.status,
      code: `http_${error.status}`,
      message: `The server could not complete the request (status ${error.status}). Try again in a moment.`,
      fields: {},
    };
  }
  return { status: 0, code: 'client_error', message: 'Something went wrong in the dashboard.', fields: {} };
}

/**
 * Puts the server's per-field messages on the matching form controls (as a `server` error, so
 * they show in each field's mat-error) and returns the sentence for the banner. Messages for
 * fields the form does not have are added to the banner text so nothing is lost.
 */
export function applyServerErrors(form: FormGroup, error: unknown): string {
  const problem = toApiProblem(error);
  const unplaced: string[] = [];
  for (const [path, message] of Object.entries(problem.fields)) {
    const control: AbstractControl | null = form.get(path);
    if (control) {
      control.setErrors({ ...(control.errors ?? {}), server: message });
      control.markAsTouched();
    } else {
      unplaced.push(`${path}: ${message}`);
    }
  }
  if (Object.keys(problem.fields).length > 0 && unplaced.length === 0) {
    return 'Some fields need attention. See the messages under each field.';
  }
  return unplaced.length > 0 ? `${problem.message} (${unplaced.join('; ')})` : problem.message;
}
