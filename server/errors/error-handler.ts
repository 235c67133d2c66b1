import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from 'pino';
import { AppError } from './app-error';

/** Unknown /api paths answer in the same error shape as everything else. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'not_found', `No API route ${req.method} ${req.path}.`));
};

/** The one error handler, registered last. Operational errors keep their status; anything else is a 500 that is logged. */
export function errorHandler(log: Logger): ErrorRequestHandler {
  return (err, req, res, _next) => {
    if (res.headersSent) {
      // Too late for an error answer: log it and end the response so the client is not left waiting.
      log.error({ err, method: req.method, url: req.originalUrl }, 'error after the answer had started');
      res.destroy();
      return;
    }
    if (err instanceof AppError) {
      res.status(err.status).json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } });
      return;
    }
    // body-parser errors carry `type` and `status`.
    if (err && typeof err === 'object' && 'type' in err && err.type === 'entity.parse.failed') {
      res.status(400).json({ error: { code: 'malformed_json', message: 'The request body is not valid JSON.' } });
      return;
    }
    if (err && typeof err === 'object' && 'type' in err && err.type === 'entity.too.large') {
      res.status(413).json({ error: { code: 'body_too_large', message: 'The request body is too large.' } });
      return;
    }
    log.error({ err, method: req.method, url: req.originalUrl }, 'unhandled error');
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on the server; it has been logged.' } });
  };
}
