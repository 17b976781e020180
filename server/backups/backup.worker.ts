/** Worker job: one backup with its check, off the server's event loop (the copy step is synchronous). */
import { serveJob } from '../workers/worker-protocol';
import { takeBackup, type BackupEntry, type BackupTrigger } from './backups.service';

serveJob<{ dbFile: string; dir: string; trigger: BackupTrigger; at: string }, never, BackupEntry>((d) =>
  takeBackup(d.dbFile, d.dir, d.trigger, new Date(d.at)),
);
