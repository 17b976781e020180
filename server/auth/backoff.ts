/**
 * Per-account back-off after failed sign-ins, keyed by the identifier typed (e-mail or badge), so an
 * unknown account behaves exactly like a known one. After FREE_FAILURES, each further failure doubles
 * the wait, up to MAX_WAIT_MS. Kept in memory: a restart forgives, which is acceptable for a lockout.
 */
const FREE_FAILURES = 5;
const BASE_WAIT_MS = 15_000;
const MAX_WAIT_MS = 15 * 60_000;
const FORGET_AFTER_MS = 60 * 60_000;

export class SignInBackoff {
  private readonly failures = new Map<string, { count: number; last: number; until: number }>();

  constructor(private readonly now: () => number = Date.now) {}

  /** Milliseconds the identifier must still wait, or 0. */
  waitMs(key: string): number {
    const f = this.failures.get(key);
    if (!f) return 0;
    const t = this.now();
    if (t - f.last > FORGET_AFTER_MS) {
      this.failures.delete(key);
      return 0;
    }
    return Math.max(0, f.until - t);
  }

  fail(key: string): void {
    const t = this.now();
    const f = this.failures.get(key) ?? { count: 0, last: t, until: 0 };
    f.count += 1;
    f.last = t;
    f.until = f.count > FREE_FAILURES ? t + Math.min(MAX_WAIT_MS, BASE_WAIT_MS * 2 ** (f.count - FREE_FAILURES - 1)) : 0;
    this.failures.set(key, f);
    if (this.failures.size > 100_000) this.prune(t);
  }

  succeed(key: string): void {
    this.failures.delete(key);
  }

  private prune(t: number): void {
    for (const [k, f] of this.failures) if (t - f.last > FORGET_AFTER_MS) this.failures.delete(k);
  }
}
