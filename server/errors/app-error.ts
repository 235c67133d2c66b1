/** An operational error with an HTTP status and a stable code; the error handler turns it into `{ error: { code, message, fields? } }`. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export const badRequest = (message: string, fields?: Record<string, string>) => new AppError(400, 'validation_failed', message, fields);
export const unauthorized = (message = 'Sign in to continue.') => new AppError(401, 'unauthorized', message);
export const forbidden = (message = 'Your role may not do this.') => new AppError(403, 'forbidden', message);
export const notFound = (what: string) => new AppError(404, 'not_found', `${what} not found.`);
export const conflict = (message: string, fields?: Record<string, string>) => new AppError(409, 'conflict', message, fields);
