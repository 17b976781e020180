import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from 'pino';
import { AppError, STATUS_OF_KIND } from './errors';

/** The one error handler: `{ error: { code, message, details? } }`, never a stack trace. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    if (res.headersSent) return;
    if (err instanceof AppError) {
      const retry = (err.details as { retryAfterSeconds?: unknown } | undefined)?.retryAfterSeconds;
      if (err.kind === 'rate_limited' && typeof retry === 'number') res.setHeader('Retry-After', String(retry));
      res
        .status(STATUS_OF_KIND[err.kind])
        .json({ error: { code: err.code, message: err.message, ...(err.details === undefined ? {} : { details: err.details }) } });
      return;
    }
    const e = err as { type?: string; status?: number; message?: string };
    // body-parser's own errors: malformed JSON, too large.
    if (e.type === 'entity.parse.failed') {
      res.status(400).json({ error: { code: 'malformed_json', message: 'The request body is not valid JSON' } });
      return;
    }
    if (e.type === 'entity.too.large') {
      res.status(413).json({ error: { code: 'body_too_large', message: 'The request body is too large' } });
      return;
    }
    logger.error({ err, url: req.originalUrl }, 'unhandled error');
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on the server; it has been logged' } });
  };
}

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: `No API route ${req.method} ${req.path}` } });
};
