/**
 * The one seam between SQLite and PostgreSQL. Everything else speaks Knex and runs on both; what
 * cannot (connection set-up, type parsing, the float column width, advisory locks) lives here.
 */
import type { Knex } from 'knex';
import pg from 'pg';
// Knex's PostgreSQL column compiler: `t.float()` is `real` (4 bytes) there but 8 bytes in SQLite.
import PgColumnCompiler from 'knex/lib/dialects/postgres/schema/pg-columncompiler.js';

export type Dialect = 'sqlite' | 'pg';

let pgPrepared = false;

/**
 * Once per process, before the first PostgreSQL connection:
 * - `count(*)` and `bigint` come back as JS numbers (the pg driver gives strings by default; our counts
 *   stay far below 2^53);
 * - `t.float()` columns are `double precision`, the width SQLite's REAL has, so the same migrations keep
 *   metres and kilograms to the same precision on both.
 */
export function preparePg(): void {
  if (pgPrepared) return;
  pgPrepared = true;
  pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));
  pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));
  (PgColumnCompiler as unknown as { prototype: { floating: string } }).prototype.floating = 'double precision';
}

export function dialectOf(db: Knex): Dialect {
  const c = db.client.config.client as unknown;
  return c === 'pg' || c === 'postgres' || c === 'postgresql' ? 'pg' : 'sqlite';
}

export function isPg(db: Knex): boolean {
  return dialectOf(db) === 'pg';
}

/** True when a connection string names PostgreSQL. */
export function isPgUrl(url: string | undefined): url is string {
  return !!url && /^postgres(ql)?:\/\//i.test(url);
}

/**
 * Runs `work` while holding a database-wide lock named by `key`: on PostgreSQL a session advisory lock
 * taken on a connection of its own (so `work` may use the pool, transactions and all), which another
 * instance asking for the same key waits on; SQLite has one writer process per file, so there `work`
 * just runs.
 */
export async function withAdvisoryLock<T>(db: Knex, key: string, work: () => Promise<T>): Promise<T> {
  if (!isPg(db)) return work();
  const conn = (await db.client.acquireConnection()) as pg.PoolClient;
  try {
    await conn.query('select pg_advisory_lock(hashtext($1))', [key]);
    try {
      return await work();
    } finally {
      await conn.query('select pg_advisory_unlock(hashtext($1))', [key]);
    }
  } finally {
    await db.client.releaseConnection(conn);
  }
}

/**
 * Within a transaction: waits for, then holds until commit, a lock named by `key` (PostgreSQL
 * `pg_advisory_xact_lock`). Check-then-insert steps that SQLite serialises on its one connection
 * (a release key seen once, orders taken once) need it when several connections write at once.
 */
export async function lockForTransaction(trx: Knex.Transaction, key: string): Promise<void> {
  if (isPg(trx)) await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [key]);
}
