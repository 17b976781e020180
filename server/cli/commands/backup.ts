/**
 * `aislewright backup create [--out FILE]`, `backup verify FILE`, `backup restore FILE`.
 * Reads DATABASE_FILE (and BACKUP_DIR) like the server. Exit codes: 0 done; 1 the file is damaged
 * or the copy failed; 2 refused (bad usage, PostgreSQL, a server is using the database).
 */
import { resolve } from 'node:path';
import type { CliIo } from '../io';
import { backupDirOf, takeBackup } from '../../backups/backups.service';
import { backupDatabase, restoreDatabase, serverUsing, verifyBackup } from '../../backups/sqlite-backup';

const USAGE = `usage: aislewright backup create [--out FILE]
       aislewright backup verify FILE
       aislewright backup restore FILE
DATABASE_FILE names the database (default data/aislewright.sqlite); backups go to BACKUP_DIR
(default: backups/ beside the database).`;

export async function run(args: string[], io: CliIo, env: NodeJS.ProcessEnv = process.env): Promise<number> {
  const [sub, ...rest] = args;
  if (!sub || sub === '--help' || sub === '-h') {
    io.out(USAGE);
    return sub ? 0 : 2;
  }
  const fail = (code: number, line: string) => {
    io.err(`aislewright backup ${sub}: ${line}`);
    return code;
  };
  if (env.DATABASE_URL) {
    return fail(2, 'DATABASE_URL points at PostgreSQL; back it up with pg_dump (README, "Backups"), not with this command');
  }
  const dbFile = resolve(env.DATABASE_FILE || 'data/aislewright.sqlite');

  if (sub === 'create') {
    let out: string | undefined;
    for (let i = 0; i < rest.length; i++) {
      const a = rest[i]!;
      if (a === '--out') out = rest[++i];
      else if (a.startsWith('--out=')) out = a.slice('--out='.length);
      else return fail(2, `unknown option ${a}\n${USAGE}`);
    }
    if (out === '') return fail(2, '--out needs a file name');
    if (dbFile === resolve(':memory:') || env.DATABASE_FILE === ':memory:') return fail(2, 'DATABASE_FILE is :memory:; there is nothing on disk to back up');
    try {
      if (out) {
        const r = await backupDatabase(dbFile, resolve(out));
        io.out(JSON.stringify({ file: r.file, bytes: r.bytes }));
      } else {
        const r = await takeBackup(dbFile, backupDirOf(dbFile, env.BACKUP_DIR || undefined), 'cli');
        io.out(JSON.stringify({ file: r.file, bytes: r.bytes }));
      }
      return 0;
    } catch (err) {
      return fail(1, (err as Error).message);
    }
  }

  if (sub === 'verify' || sub === 'restore') {
    if (rest.length !== 1 || rest[0]!.startsWith('-')) return fail(2, `give one backup file\n${USAGE}`);
    const file = resolve(rest[0]!);
    if (sub === 'verify') {
      const r = verifyBackup(file);
      io.out(JSON.stringify(r));
      if (!r.ok) return fail(1, `damaged: ${r.problems.join('; ')}`);
      return 0;
    }
    if (file === dbFile) return fail(2, 'the backup file is the database itself');
    const pid = serverUsing(dbFile);
    if (pid !== null) return fail(2, `a server (pid ${pid}) is using ${dbFile}; stop it first, then restore`);
    const check = verifyBackup(file);
    if (!check.ok) return fail(1, `not restored, the backup is damaged: ${check.problems.join('; ')}`);
    try {
      const r = restoreDatabase(file, dbFile);
      io.out(JSON.stringify({ restored: r.restored, replaced: r.replaced, tables: check.tables }));
      return 0;
    } catch (err) {
      return fail(1, (err as Error).message);
    }
  }
  return fail(2, `unknown subcommand\n${USAGE}`);
}
