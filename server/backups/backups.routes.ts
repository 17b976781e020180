import { createReadStream } from 'node:fs';
import { join } from 'node:path';
import { z } from 'zod';
import { BackupItem, BackupsStatus } from '../../shared/data-safety';
import type { Deps } from '../deps';
import { AppError, notFound } from '../http/errors';
import { setAttachmentHeaders } from '../http/attachment';
import { defineRoute } from '../http/route';
import type { BackupEntry } from './backups.service';
import { isBackupName } from './backups.service';

const toItem = (b: BackupEntry): BackupItem => ({
  name: b.name,
  createdAt: b.createdAt,
  bytes: b.bytes,
  ms: b.ms,
  verified: b.verified,
  problems: b.problems,
  trigger: b.trigger,
});

function status(deps: Deps): BackupsStatus {
  const r = deps.backups;
  if (!r) {
    return {
      available: false,
      reason: 'This server runs on an in-memory database: there is no file to back up.',
      dir: null,
      everyHours: deps.config.BACKUP_EVERY_HOURS,
      keep: deps.config.BACKUP_KEEP,
      nextAt: null,
      running: false,
      lastFailure: null,
      backups: [],
    };
  }
  return {
    available: true,
    reason: null,
    dir: r.dir,
    everyHours: r.options.everyHours,
    keep: r.options.keep,
    nextAt: r.nextAt?.toISOString() ?? null,
    running: r.busy,
    lastFailure: r.lastFailure(),
    backups: r.list().map(toItem),
  };
}

const unavailable = () => new AppError('conflict', 'backups_unavailable', 'Backups are not available: this server has no database file');

export const backupRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/admin/backups',
    access: ['admin'],
    summary: 'Backups in BACKUP_DIR (newest first), the schedule and the last failure',
    response: BackupsStatus,
    handler: ({ deps }) => status(deps),
  }),
  defineRoute({
    method: 'post',
    path: '/api/admin/backups',
    access: ['admin'],
    summary: 'Back up now (online, consistent; checked after copying)',
    status: 201,
    body: z.strictObject({}),
    response: BackupItem,
    handler: async ({ deps, user }) => {
      if (!deps.backups) throw unavailable();
      try {
        return toItem(await deps.backups.backupNow('admin', user.id));
      } catch (err) {
        throw new AppError('internal', 'backup_failed', `The backup failed: ${(err as Error).message}`);
      }
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/admin/backups/:name',
    access: ['admin'],
    summary: 'Download one backup file',
    handler: ({ deps, params, res }) => {
      if (!deps.backups) throw unavailable();
      const name = params.name ?? '';
      // Only our own file names: nothing else in (or outside) the folder can be asked for.
      if (!isBackupName(name)) throw notFound('Backup');
      const entry = deps.backups.list().find((b) => b.name === name);
      if (!entry) throw notFound('Backup');
      setAttachmentHeaders(res, 'application/vnd.sqlite3', name);
      res.setHeader('Content-Length', String(entry.bytes));
      return new Promise<undefined>((resolve, reject) => {
        const s = createReadStream(join(deps.backups!.dir, name));
        s.on('error', reject);
        s.on('end', () => resolve(undefined));
        s.pipe(res);
      });
    },
  }),
];
