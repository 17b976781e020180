import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from 'node:fs';
import { dirname } from 'node:path';
import knexFactory, { type Knex } from 'knex';
import type BetterSqlite3 from 'better-sqlite3';
import { isPgUrl, preparePg } from './dialect';
import { migrationSource } from './migration-source';

export type Db = Knex;

/** What a repository function runs on: the database, or a transaction a service opened. */
export type Q = Knex | Knex.Transaction;

/**
 * True for a UNIQUE constraint failure (SQLite `SQLITE_CONSTRAINT_UNIQUE`, PostgreSQL 23505): the row
 * another request inserted first, reported as a conflict rather than a crash.
 */
export function isUniqueViolation(err: unknown): boolean {
  const e = err as { code?: unknown } | null;
  return !!e && (e.code === 'SQLITE_CONSTRAINT_UNIQUE' || e.code === '23505');
}

/** `work`'s answer; a UNIQUE violation (a parallel request inserted the row first) becomes `conflict()` instead. */
export async function uniqueOrConflict<T>(work: Promise<T>, conflict: () => Error): Promise<T> {
  try {
    return await work;
  } catch (err) {
    throw isUniqueViolation(err) ? conflict() : err;
  }
}

export interface OpenDbOptions {
  /** PostgreSQL only: schema to work in (tests give each file its own). */
  schema?: string;
  /** PostgreSQL only: connections in this instance's pool (default 10). */
  poolMax?: number;
}

/**
 * Opens the database: a `postgres://` URL selects PostgreSQL (the pg driver), anything else is a
 * SQLite file (or `:memory:`).
 */
export function openDb(target: string, options: OpenDbOptions = {}): Db {
  if (isPgUrl(target)) return openPg(target, options);
  return openSqlite(target);
}

/** PostgreSQL through the pg driver; type parsing and float width are set in dialect.ts. */
function openPg(url: string, options: OpenDbOptions): Db {
  preparePg();
  return knexFactory({
    client: 'pg',
    connection: url,
    ...(options.schema ? { searchPath: [options.schema] } : {}),
    pool: { min: 0, max: options.poolMax ?? 10 },
  });
}

/**
 * Opens the SQLite database. Every connection gets WAL, synchronous=FULL (confirmations must survive
 * power loss; NORMAL may roll back the last commits), foreign keys on and a busy timeout (SQLite's
 * documentation; FULL costs ≈ 0.7 ms per commit here).
 * Knex's SQLite pool holds one connection.
 */
function openSqlite(file: string): Db {
  if (file !== ':memory:') prepareDataFile(file);
  return knexFactory({
    client: 'better-sqlite3',
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: BetterSqlite3.Database, done: (err: Error | null, conn: unknown) => void) {
        try {
          if (file !== ':memory:') {
            conn.pragma('journal_mode = WAL');
            // SQLite gives -wal and -shm the main file's mode; made explicit for files from older versions.
            for (const side of [`${file}-wal`, `${file}-shm`]) if (existsSync(side)) chmodSync(side, 0o600);
          }
          conn.pragma('synchronous = FULL');
          conn.pragma('foreign_keys = ON');
          conn.pragma('busy_timeout = 5000');
          done(null, conn);
        } catch (err) {
          done(err as Error, conn);
        }
      },
    },
  });
}

/**
 * The database holds password hashes and live links: owner-only. A folder we create is 0700 (an
 * existing folder is left as it is: it may be shared, like /tmp); the file is created 0600 before
 * SQLite opens it, and an existing file is narrowed to 0600.
 */
function prepareDataFile(file: string): void {
  const dir = dirname(file);
  if (!existsSync(dir)) mkdirSync(dir, { recursive: true, mode: 0o700 });
  if (!existsSync(file)) closeSync(openSync(file, 'a', 0o600));
  chmodSync(file, 0o600);
}

/**
 * Runs pending migrations. Knex takes its migration lock (a row in knex_migrations_lock, under a
 * transaction) so two instances starting at once run each migration once; the second waits, then finds
 * nothing to do. On PostgreSQL the whole run is also held under an advisory lock: on an empty database
 * two instances would otherwise both create Knex's own bookkeeping tables, and the second start failed
 * with "relation knex_migrations already exists" (seen with two instances started together).
 */
export async function migrateLatest(db: Db): Promise<void> {
  const pg = (db.client as { config: Knex.Config }).config.client === 'pg';
  const poolMax = (db.client as { config: Knex.Config }).config.pool?.max ?? 10;
  // The lock's transaction holds one connection while the migrations use another.
  if (pg && poolMax >= 2) {
    await db.transaction(async (trx) => {
      await trx.raw('select pg_advisory_xact_lock(?)', [MIGRATION_LOCK_KEY]);
      await migrateWithRetry(db);
    });
    return;
  }
  await migrateWithRetry(db);
}

/** Advisory-lock key of the migration run (any fixed 64-bit number; "AWMIGRAT" in ASCII). */
const MIGRATION_LOCK_KEY = '4708316912563667284';

async function migrateWithRetry(db: Db): Promise<void> {
  for (let attempt = 0; ; attempt++) {
    try {
      await db.migrate.latest({ migrationSource });
      return;
    } catch (err) {
      // Another instance holds the lock (knex fails fast rather than waiting): try again shortly.
      if (!/Migration table is already locked/i.test((err as Error).message) || attempt > 120) throw err;
      await new Promise((r) => setTimeout(r, 500));
    }
  }
}

/** ISO 8601 timestamp for TEXT columns. */
export function nowIso(): string {
  return new Date().toISOString();
}
