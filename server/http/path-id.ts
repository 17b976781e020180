import { notFound } from './errors';

const DIGITS = /^\d+$/;

/**
 * The one reader of numeric ids in a path (`/orders/:id`): a whole number written in plain digits,
 * at least `min` (1 for row ids; 0 for a list index). Anything else names nothing, so it answers like
 * an unknown id: 404 `not_found` ("<what> not found"), the same answer everywhere.
 */
export function pathId(value: string | undefined, what: string, min = 1): number {
  const n = value !== undefined && DIGITS.test(value) ? Number(value) : NaN;
  if (!Number.isSafeInteger(n) || n < min) throw notFound(what);
  return n;
}
