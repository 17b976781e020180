import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from 'node:fs';
import { dirname } from 'node:path';
import knexFactory, { type Knex } from 'knex';
import type BetterSqlite3 from 'better-sqlite3';
import { migrationSource } from './migration-source';

export type Db = Knex;

/**
 * Opens the SQLite database. Every connection gets WAL, synchronous=FULL (confirmations must survive
 * power loss; NORMAL may roll back the last commits), foreign keys on and a busy timeout (SQLite's
 * documentation; FULL costs ≈ 0.7 ms per commit here).
 * Knex's SQLite pool holds one connection.
 */
export function openDb(file: string): Db {
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

export async function migrateLatest(db: Db): Promise<void> {
  await db.migrate.latest({ migrationSource });
}

/** ISO 8601 timestamp for TEXT columns. */
export function nowIso(): string {
  return new Date().toISOString();
}
