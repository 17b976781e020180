/**
 * Backups kept in one folder (BACKUP_DIR): each `aislewright-<UTC time>.sqlite` has a small manifest
 * beside it (`….sqlite.json`: when, size, how long, verified, rows per table), so the admin screen
 * lists them without opening every file. Used by the server (schedule, "Back up now") and the CLI.
 */
import { existsSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { backupDatabase, backupName, verifyBackup } from './sqlite-backup';

export type BackupTrigger = 'schedule' | 'admin' | 'cli';

export interface BackupEntry {
  name: string;
  file: string;
  createdAt: string;
  bytes: number;
  /** Copy time in ms; null when the manifest is missing. */
  ms: number | null;
  /** true: integrity check passed; false: failed; null: never checked (no manifest). */
  verified: boolean | null;
  problems: string[];
  trigger: BackupTrigger | null;
  tables: Record<string, number>;
}

const NAME = /^aislewright-(\d{8})-(\d{6})\.sqlite$/;

/** BACKUP_DIR, else `backups` in the database's folder (the data folder). */
export function backupDirOf(dbFile: string, explicit?: string): string {
  return resolve(explicit ?? join(dirname(resolve(dbFile)), 'backups'));
}

/** Is `name` one of our backup file names (guards the download route against paths). */
export function isBackupName(name: string): boolean {
  return NAME.test(name);
}

function timeOfName(name: string): string | null {
  const m = NAME.exec(name);
  if (!m) return null;
  const [d, t] = [m[1]!, m[2]!];
  return `${d.slice(0, 4)}-${d.slice(4, 6)}-${d.slice(6, 8)}T${t.slice(0, 2)}:${t.slice(2, 4)}:${t.slice(4, 6)}.000Z`;
}

/** Copies the database into `dir` under a fresh name, checks the copy, writes its manifest (0600). */
export async function takeBackup(dbFile: string, dir: string, trigger: BackupTrigger, at: Date = new Date()): Promise<BackupEntry> {
  let name = backupName(at);
  // Two backups in one second (a click right after the schedule): step the name on by a second.
  for (let k = 1; existsSync(join(dir, name)); k++) name = backupName(new Date(at.getTime() + k * 1000));
  const file = join(dir, name);
  const copy = await backupDatabase(dbFile, file);
  const check = verifyBackup(file);
  const entry: BackupEntry = {
    name,
    file,
    createdAt: at.toISOString(),
    bytes: copy.bytes,
    ms: Math.round(copy.ms),
    verified: check.ok,
    problems: check.problems,
    trigger,
    tables: check.tables,
  };
  writeFileSync(`${file}.json`, JSON.stringify(entry, null, 2), { mode: 0o600 });
  if (!check.ok) throw new Error(`backup ${name} failed its integrity check: ${check.problems.join('; ')}`);
  return entry;
}

/** Backups in `dir`, newest first. */
export function listBackups(dir: string): BackupEntry[] {
  if (!existsSync(dir)) return [];
  const out: BackupEntry[] = [];
  for (const name of readdirSync(dir)) {
    if (!isBackupName(name)) continue;
    const file = join(dir, name);
    let manifest: Partial<BackupEntry> = {};
    try {
      manifest = JSON.parse(readFileSync(`${file}.json`, 'utf8')) as Partial<BackupEntry>;
    } catch {
      manifest = {};
    }
    out.push({
      name,
      file,
      createdAt: manifest.createdAt ?? timeOfName(name)!,
      bytes: statSync(file).size,
      ms: manifest.ms ?? null,
      verified: manifest.verified ?? null,
      problems: manifest.problems ?? [],
      trigger: manifest.trigger ?? null,
      tables: manifest.tables ?? {},
    });
  }
  return out.sort((a, b) => (a.name < b.name ? 1 : -1));
}

/** Deletes all but the newest `keep` backups (and their manifests); returns the names removed. */
export function pruneBackups(dir: string, keep: number): string[] {
  const old = listBackups(dir).slice(keep);
  for (const b of old) {
    rmSync(b.file, { force: true });
    rmSync(`${b.file}.json`, { force: true });
  }
  return old.map((b) => basename(b.file));
}
