import type { FieldIssue } from '../../shared/common';

/** What went wrong, independent of HTTP; the error handler maps each kind to a status. */
export type ErrorKind = 'validation' | 'unauthenticated' | 'forbidden' | 'not_found' | 'conflict' | 'unprocessable' | 'too_large' | 'rate_limited' | 'internal';

export const STATUS_OF_KIND: Record<ErrorKind, number> = {
  validation: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  unprocessable: 422,
  rate_limited: 429,
  internal: 500,
};

/** The one error type services throw. `code` is stable and machine-readable; `message` is for people. */
export class AppError extends Error {
  constructor(
    readonly kind: ErrorKind,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export const notFound = (what: string): AppError => new AppError('not_found', 'not_found', `${what} not found`);
export const invalid = (message: string, issues: FieldIssue[]): AppError => new AppError('validation', 'validation_failed', message, issues);
