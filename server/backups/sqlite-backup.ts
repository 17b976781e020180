/**
 * Online backups of the SQLite database through SQLite's backup API (better-sqlite3 `db.backup()`),
 * never a file copy: a copy of the main file misses commits still in the `-wal` file, and a copy taken
 * mid-write can be torn. The backup API reads one consistent snapshot (WAL readers see the database as
 * of their read transaction) while the server goes on writing.
 */
import {
  closeSync,
  existsSync,
  fsyncSync,
  openSync,
  readFileSync,
  renameSync,
  rmSync,
  statSync,
  chmodSync,
  writeFileSync,
  copyFileSync,
  mkdirSync,
} from 'node:fs';
import { basename, dirname, join } from 'node:path';
import Database from 'better-sqlite3';

export interface BackupResult {
  file: string;
  bytes: number;
  /** Milliseconds the copy took (backup API only, not the check). */
  ms: number;
}

export interface VerifyResult {
  ok: boolean;
  /** `ok`, or SQLite's list of problems (first 20). */
  problems: string[];
  /** Rows per table, by name; empty when the file could not be read at all. */
  tables: Record<string, number>;
}

/**
 * Creates a folder and its missing parents. Not `mkdirSync(dir, { recursive: true })`: on Node 20 that
 * call spins forever when the kernel refuses the folder with ENOENT although its parent exists (seen
 * here with BACKUP_DIR under /proc), which would hang the server's event loop.
 */
export function ensureDir(dir: string, mode = 0o755): void {
  if (existsSync(dir)) return;
  const parent = dirname(dir);
  if (parent !== dir) ensureDir(parent, mode);
  try {
    mkdirSync(dir, { mode });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
  }
}

/** Backup file name for a moment: `aislewright-20261205-013000.sqlite` (UTC, sortable). */
export function backupName(at: Date = new Date(), prefix = 'aislewright'): string {
  const s = at.toISOString().replace(/[-:]/g, '').replace('T', '-').slice(0, 15);
  return `${prefix}-${s}.sqlite`;
}

/**
 * Copies the database at `source` into `out` (created 0600, parent folder made). The copy is written
 * to a temporary name and renamed when complete, so a crash never leaves a half file under the
 * final name. Pages are copied in one step: a step is one read snapshot, and with WAL it does not
 * block writers; smaller steps would restart whenever another connection commits between them.
 */
export async function backupDatabase(source: string, out: string): Promise<BackupResult> {
  if (!existsSync(source)) throw new Error(`no database at ${source}`);
  ensureDir(dirname(out));
  const tmp = join(dirname(out), `.${basename(out)}.partial`);
  rmSync(tmp, { force: true });
  const src = new Database(source, { fileMustExist: true });
  const started = performance.now();
  try {
    src.pragma('busy_timeout = 5000');
    await src.backup(tmp, { progress: ({ remainingPages }) => Math.max(remainingPages, 1) });
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  } finally {
    src.close();
  }
  const ms = performance.now() - started;
  chmodSync(tmp, 0o600);
  // The copy carries the source's WAL flag: switch it to a rollback journal so the backup is one
  // self-contained file that opens read-only anywhere.
  const copy = new Database(tmp, { fileMustExist: true });
  try {
    copy.pragma('journal_mode = DELETE');
  } finally {
    copy.close();
  }
  const fd = openSync(tmp, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, out);
  chmodSync(out, 0o600);
  return { file: out, bytes: statSync(out).size, ms };
}

/** `PRAGMA integrity_check` and row counts per table; a file that is not a database is "damaged". */
export function verifyBackup(file: string): VerifyResult {
  if (!existsSync(file)) return { ok: false, problems: [`no file at ${file}`], tables: {} };
  let db: Database.Database | null = null;
  try {
    db = new Database(file, { readonly: true, fileMustExist: true });
    const rows = db.prepare('PRAGMA integrity_check(20)').pluck().all() as string[];
    const problems = rows.length === 1 && rows[0] === 'ok' ? [] : rows;
    const names = db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").pluck().all() as string[];
    const tables: Record<string, number> = {};
    for (const name of names)
      tables[name] = db
        .prepare(`SELECT count(*) FROM "${name.replace(/"/g, '""')}"`)
        .pluck()
        .get() as number;
    if (problems.length === 0 && !('knex_migrations' in tables)) problems.push('not an Aislewright database (no knex_migrations table)');
    return { ok: problems.length === 0, problems, tables };
  } catch (err) {
    return { ok: false, problems: [(err as Error).message], tables: {} };
  } finally {
    db?.close();
  }
}

/** `aislewright.sqlite.replaced-20261205-013000` beside the database. */
export function replacedName(dbFile: string, at: Date = new Date()): string {
  const s = at.toISOString().replace(/[-:]/g, '').replace('T', '-').slice(0, 15);
  return `${dbFile}.replaced-${s}`;
}

/**
 * Puts the (already verified) backup at `dbFile`. An existing database is first checkpointed (its
 * `-wal` folded in, so the kept file is whole) and renamed to `<file>.replaced-<time>`; the backup is
 * copied to a temporary name beside it, synced, and renamed into place.
 */
export function restoreDatabase(backup: string, dbFile: string, at: Date = new Date()): { restored: string; replaced: string | null } {
  ensureDir(dirname(dbFile));
  let replaced: string | null = null;
  if (existsSync(dbFile)) {
    const cur = new Database(dbFile, { fileMustExist: true });
    try {
      cur.pragma('busy_timeout = 5000');
      cur.pragma('wal_checkpoint(TRUNCATE)');
    } finally {
      cur.close();
    }
    replaced = replacedName(dbFile, at);
    renameSync(dbFile, replaced);
  }
  for (const side of ['-wal', '-shm', '-journal']) rmSync(`${dbFile}${side}`, { force: true });
  const tmp = join(dirname(dbFile), `.${basename(dbFile)}.restoring`);
  copyFileSync(backup, tmp);
  chmodSync(tmp, 0o600);
  const fd = openSync(tmp, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, dbFile);
  return { restored: dbFile, replaced };
}

/**
 * The running server's claim on its database file: `<file>.server` holds its pid. Restore refuses
 * while that process is alive; a file left by a crashed server (dead pid) is ignored.
 */
export function serverLockFile(dbFile: string): string {
  return `${dbFile}.server`;
}

export function claimDatabase(dbFile: string, pid = process.pid): () => void {
  const lock = serverLockFile(dbFile);
  writeFileSync(lock, JSON.stringify({ pid, since: new Date().toISOString() }), { mode: 0o600 });
  return () => {
    try {
      const held = JSON.parse(readFileSync(lock, 'utf8')) as { pid?: number };
      if (held.pid === pid) rmSync(lock, { force: true });
    } catch {
      // Already gone.
    }
  };
}

/** The pid of a live server holding `dbFile`, or null. */
export function serverUsing(dbFile: string): number | null {
  const lock = serverLockFile(dbFile);
  if (!existsSync(lock)) return null;
  let pid: number | undefined;
  try {
    pid = (JSON.parse(readFileSync(lock, 'utf8')) as { pid?: number }).pid;
  } catch {
    return null;
  }
  if (typeof pid !== 'number' || !Number.isInteger(pid) || pid <= 0) return null;
  try {
    process.kill(pid, 0);
    return pid;
  } catch (err) {
    // EPERM: the process exists but belongs to someone else — still a server using the file.
    return (err as NodeJS.ErrnoException).code === 'EPERM' ? pid : null;
  }
}

export function fileSize(file: string): number {
  return statSync(file).size;
}
