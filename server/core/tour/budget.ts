/**
 * Time budgets for tour methods. A budget is a clock plus an absolute deadline in its milliseconds;
 * hot loops test `expired` every few hundred steps so a run overshoots by well under a millisecond.
 */
import type { Clock } from '../clock';
import { defaultClock } from '../clock';

export interface BudgetOptions {
  /** Wall-clock budget in milliseconds; omitted or Infinity means no limit. */
  timeLimitMs?: number;
  /** Time source; `defaultClock` (performance.now) when omitted. */
  clock?: Clock;
}

export interface Budget {
  readonly clock: Clock;
  /** Absolute deadline on `clock`'s scale (Infinity when unlimited). */
  readonly deadline: number;
  expired(): boolean;
}

export function budgetOf(opts: BudgetOptions = {}): Budget {
  const clock = opts.clock ?? defaultClock;
  const limit = opts.timeLimitMs ?? Infinity;
  if (!(limit >= 0)) throw new RangeError(`timeLimitMs must be a non-negative number, got ${limit}`);
  const deadline = limit === Infinity ? Infinity : clock() + limit;
  return { clock, deadline, expired: deadline === Infinity ? () => false : () => clock() >= deadline };
}

/** The part of `budget` that ends at `at` on its clock (or at its own deadline, whichever is first). */
export function budgetUntil(budget: Budget, at: number): Budget {
  const { clock } = budget;
  const deadline = Math.min(budget.deadline, at);
  return { clock, deadline, expired: () => clock() >= deadline };
}

/** Thrown by a method that cannot return any answer before its budget runs out (only the exact one). */
export class TimeLimitError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'TimeLimitError';
  }
}
