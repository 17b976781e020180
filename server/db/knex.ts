import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import knexFactory, { type Knex } from 'knex';
import type BetterSqlite3 from 'better-sqlite3';
import { migrationSource } from './migration-source';

export type Db = Knex;

/**
 * Opens the SQLite database. Every connection gets WAL, synchronous=FULL (confirmations must survive
 * power loss; NORMAL may roll back the last commits), foreign keys on and a busy timeout (STACK.md).
 * Knex's SQLite pool holds one connection.
 */
export function openDb(file: string): Db {
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true });
  return knexFactory({
    client: 'better-sqlite3',
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: BetterSqlite3.Database, done: (err: Error | null, conn: unknown) => void) {
        try {
          if (file !== ':memory:') conn.pragma('journal_mode = WAL');
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

export async function migrateLatest(db: Db): Promise<void> {
  await db.migrate.latest({ migrationSource });
}

/** ISO 8601 timestamp for TEXT columns. */
export function nowIso(): string {
  return new Date().toISOString();
}
