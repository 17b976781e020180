/**
 * express-rate-limit store kept in the database (table rate_limits), so every instance on one
 * PostgreSQL counts the same window for an address. One upsert per request: a new or expired window
 * starts at 1, otherwise the count goes up; portable SQL (ON CONFLICT … DO UPDATE … RETURNING runs on
 * SQLite ≥ 3.35 and PostgreSQL).
 */
import type { Knex } from 'knex';
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';

export class DbRateLimitStore implements Store {
  windowMs = 60_000;
  readonly localKeys = false;

  constructor(
    private readonly db: Knex,
    readonly prefix = 'sign-in:',
    private readonly now: () => number = Date.now,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const row = await this.db('rate_limits')
      .where({ key: this.prefix + key })
      .first<{ hits: number; reset_at: number } | undefined>();
    if (!row || Number(row.reset_at) <= this.now()) return undefined;
    return { totalHits: row.hits, resetTime: new Date(Number(row.reset_at)) };
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const now = this.now();
    const resetAt = now + this.windowMs;
    const [row] = (await this.db('rate_limits')
      .insert({ key: this.prefix + key, hits: 1, reset_at: resetAt })
      .onConflict('key')
      .merge({
        hits: this.db.raw('CASE WHEN rate_limits.reset_at <= ? THEN 1 ELSE rate_limits.hits + 1 END', [now]),
        reset_at: this.db.raw('CASE WHEN rate_limits.reset_at <= ? THEN ? ELSE rate_limits.reset_at END', [now, resetAt]),
      })
      .returning(['hits', 'reset_at'])) as { hits: number; reset_at: number }[];
    return { totalHits: Number(row!.hits), resetTime: new Date(Number(row!.reset_at)) };
  }

  async decrement(key: string): Promise<void> {
    await this.db('rate_limits')
      .where({ key: this.prefix + key })
      .andWhere('hits', '>', 0)
      .decrement('hits', 1);
  }

  async resetKey(key: string): Promise<void> {
    await this.db('rate_limits')
      .where({ key: this.prefix + key })
      .delete();
  }

  /** Drops windows that ended (called now and then; a stale row is also reset by the next hit). */
  async sweep(): Promise<void> {
    await this.db('rate_limits').where('reset_at', '<=', this.now()).delete();
  }
}
