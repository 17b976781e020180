import type { Knex } from 'knex';

/**
 * Sign-in limits kept in the database (table `auth_throttle`), so every app instance sees the same
 * counts and a restart forgives nothing. Portable Knex only: an insert that ignores a conflict, then
 * compare-and-set updates (`where count = <read>`), which are atomic per row on SQLite and PostgreSQL.
 *
 * Two kinds of key:
 * - back-off (`acct:…`): an attempt is counted *before* its secret is checked. After FREE_FAILURES
 *   attempts since the last success, the next attempt starts a wait that doubles per attempt, from
 *   BASE_WAIT_MS up to MAX_WAIT_MS; attempts inside a wait are refused without a hash check. So
 *   however many guesses arrive at once, at most FREE_FAILURES + 1 are checked before the first wait,
 *   and one per wait after it.
 * - fixed window (`pair:…`, `reset:…`): at most `limit` claims per `windowMs`.
 */
export const FREE_FAILURES = 5;
const BASE_WAIT_MS = 15_000;
const MAX_WAIT_MS = 15 * 60_000;
const FORGET_AFTER_MS = 60 * 60_000;
/** Compare-and-set retries under contention before the attempt is refused for a moment. */
const MAX_TRIES = 50;
const PRUNE_EVERY = 500;

interface DbThrottleRow {
  key: string;
  count: number;
  started_at: number | string;
  last_at: number | string;
  until: number | string;
}

export type Claim = { ok: true } | { ok: false; waitMs: number };

export interface WindowLimit {
  limit: number;
  windowMs: number;
}

export class SignInBackoff {
  private claims = 0;

  constructor(
    private readonly db: Knex,
    private readonly now: () => number = Date.now,
  ) {}

  /** Counts one attempt against an account's back-off; refuses while a wait runs. */
  claimAttempt(key: string): Promise<Claim> {
    return this.claim(key, (row, t) => {
      const fresh = !row || t - Number(row.last_at) > FORGET_AFTER_MS;
      const count = fresh ? 0 : row.count;
      const until = fresh ? 0 : Number(row.until);
      if (until > t) return { refuse: until - t };
      const next = count + 1;
      const wait = next > FREE_FAILURES ? Math.min(MAX_WAIT_MS, BASE_WAIT_MS * 2 ** (next - FREE_FAILURES - 1)) : 0;
      return { set: { count: next, started_at: fresh ? t : Number(row.started_at), last_at: t, until: wait ? t + wait : 0 } };
    });
  }

  /** Counts one use of a fixed-window budget; refuses once `limit` were used in the window. */
  claimWindow(key: string, w: WindowLimit): Promise<Claim> {
    return this.claim(key, (row, t) => {
      const fresh = !row || t - Number(row.started_at) >= w.windowMs;
      if (!fresh && row.count >= w.limit) return { refuse: Number(row.started_at) + w.windowMs - t };
      return { set: { count: fresh ? 1 : row.count + 1, started_at: fresh ? t : Number(row.started_at), last_at: t, until: 0 } };
    });
  }

  /** A right secret: the account starts afresh. */
  async succeed(key: string): Promise<void> {
    await this.db('auth_throttle').where({ key }).delete();
  }

  /** Milliseconds a back-off key must still wait, or 0 (read only). */
  async waitMs(key: string): Promise<number> {
    const row = await this.db<DbThrottleRow>('auth_throttle').where({ key }).first();
    return row ? Math.max(0, Number(row.until) - this.now()) : 0;
  }

  private async claim(
    key: string,
    decide: (row: DbThrottleRow | undefined, t: number) => { refuse: number } | { set: Omit<DbThrottleRow, 'key'> },
  ): Promise<Claim> {
    const t0 = this.now();
    if (++this.claims % PRUNE_EVERY === 0) await this.prune(t0);
    for (let i = 0; i < MAX_TRIES; i++) {
      const row = await this.db<DbThrottleRow>('auth_throttle').where({ key }).first();
      if (!row) {
        // A placeholder (last_at 0) that the compare-and-set below then claims like any row.
        await this.db('auth_throttle').insert({ key, count: 0, started_at: t0, last_at: 0, until: 0 }).onConflict('key').ignore();
        continue;
      }
      const t = this.now();
      const d = decide(Number(row.last_at) === 0 ? undefined : row, t);
      if ('refuse' in d) return { ok: false, waitMs: Math.max(1000, d.refuse) };
      // Only succeeds if no other attempt changed the row since it was read.
      const n = await this.db('auth_throttle').where({ key, count: row.count, last_at: row.last_at }).update(d.set);
      if (n === 1) return { ok: true };
    }
    return { ok: false, waitMs: 1000 };
  }

  private async prune(t: number): Promise<void> {
    await this.db('auth_throttle')
      .where('last_at', '<', t - FORGET_AFTER_MS)
      .andWhere('until', '<', t)
      .delete();
  }
}
