/**
 * The server's backups: "Back up now" and the schedule (every BACKUP_EVERY_HOURS, keeping the newest
 * BACKUP_KEEP). Each backup runs in a worker thread. A failed backup is logged, kept for the admin
 * screen (and in `last-failure.json` in the folder, so it survives a restart) and mailed to every
 * active admin. The timer is unref'd and `stop()` clears it, so tests and shutdown never hang.
 */
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Mailer } from '../mail/mailer';
import { audit } from '../audit/audit';
import { runInWorker } from '../workers/spawn';
import { listBackups, pruneBackups, takeBackup, type BackupEntry, type BackupTrigger } from './backups.service';
import { ensureDir } from './sqlite-backup';

export interface BackupFailure {
  at: string;
  message: string;
  trigger: BackupTrigger;
}

export interface BackupRunnerOptions {
  dbFile: string;
  dir: string;
  everyHours: number;
  keep: number;
  db: Knex;
  mailer: Mailer;
  logger: Logger;
  publicUrl: string;
  /** Run the copy in a worker thread (default). Tests may run it in-process. */
  inWorker?: boolean;
}

const HOUR_MS = 3_600_000;
/** setTimeout's ceiling (about 24.8 days); longer waits are taken in steps. */
const MAX_TIMER_MS = 2 ** 31 - 1;

export class BackupRunner {
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<BackupEntry> | null = null;
  private stopped = false;
  /** The last failure when the folder itself could not take the note. */
  private failure: BackupFailure | null = null;
  nextAt: Date | null = null;

  constructor(readonly options: BackupRunnerOptions) {}

  get dir(): string {
    return this.options.dir;
  }

  list(): BackupEntry[] {
    return listBackups(this.options.dir);
  }

  lastFailure(): BackupFailure | null {
    try {
      return JSON.parse(readFileSync(join(this.options.dir, 'last-failure.json'), 'utf8')) as BackupFailure;
    } catch {
      return this.failure;
    }
  }

  get busy(): boolean {
    return this.running !== null;
  }

  /** One backup now; a second call while one runs waits for that one instead of starting another. */
  backupNow(trigger: BackupTrigger, userId: number | null = null): Promise<BackupEntry> {
    if (this.running) return this.running;
    this.running = this.runOnce(trigger, userId).finally(() => {
      this.running = null;
    });
    return this.running;
  }

  private async runOnce(trigger: BackupTrigger, userId: number | null): Promise<BackupEntry> {
    const { dbFile, dir, keep, db, logger } = this.options;
    const at = new Date();
    try {
      ensureDir(dir, 0o700);
      const entry =
        this.options.inWorker === false
          ? await takeBackup(dbFile, dir, trigger, at)
          : await runInWorker<BackupEntry>(
              new URL('./backup.worker.ts', import.meta.url),
              { dbFile, dir, trigger, at: at.toISOString() },
              { timeoutMs: 30 * 60_000, heapMb: 256 },
            );
      const removed = pruneBackups(dir, keep);
      rmSync(join(dir, 'last-failure.json'), { force: true });
      this.failure = null;
      await audit(db, { userId, action: 'backup.created', subject: entry.name, detail: { bytes: entry.bytes, ms: entry.ms, trigger, removed } });
      logger.info({ backup: entry.name, bytes: entry.bytes, ms: entry.ms }, 'backup created');
      return entry;
    } catch (err) {
      const message = (err as Error).message;
      const failure: BackupFailure = { at: at.toISOString(), message, trigger };
      logger.error({ err: message }, 'backup failed');
      this.failure = failure;
      try {
        ensureDir(dir, 0o700);
        writeFileSync(join(dir, 'last-failure.json'), JSON.stringify(failure), { mode: 0o600 });
      } catch {
        // The folder itself may be the problem; the mail and the log still say so.
      }
      await this.mailFailure(failure).catch((e: unknown) => logger.error({ err: (e as Error).message }, 'could not mail the backup failure'));
      await audit(db, { userId, action: 'backup.failed', detail: { message, trigger } }).catch(() => undefined);
      throw err;
    }
  }

  private async mailFailure(f: BackupFailure): Promise<void> {
    const admins = await this.options.db('users').where({ role: 'admin', active: true }).whereNotNull('email').select<{ email: string }[]>('email');
    const text = [
      `The ${f.trigger === 'schedule' ? 'scheduled' : 'requested'} backup of the Aislewright database failed at ${f.at}.`,
      '',
      `Reason: ${f.message}`,
      `Backup folder: ${this.options.dir}`,
      '',
      `See Admin → Backups: ${this.options.publicUrl}/admin/backups`,
    ].join('\n');
    for (const a of admins) await this.options.mailer.send({ to: a.email, subject: 'Aislewright: a backup failed', text });
  }

  /**
   * Starts the schedule: the next backup is due `everyHours` after the newest one in the folder (at
   * once when there is none or it is overdue), so restarts neither skip nor repeat backups.
   */
  start(now: Date = new Date()): void {
    if (this.options.everyHours <= 0) return;
    this.stopped = false;
    const newest = this.list()[0];
    const due = newest ? new Date(newest.createdAt).getTime() + this.options.everyHours * HOUR_MS : now.getTime();
    this.arm(Math.max(due, now.getTime() + 5_000));
  }

  private arm(at: number): void {
    if (this.stopped) return;
    this.nextAt = new Date(at);
    const wait = Math.min(Math.max(at - Date.now(), 0), MAX_TIMER_MS);
    this.timer = setTimeout(() => {
      this.timer = null;
      if (Date.now() < at) return this.arm(at);
      let failed = false;
      void this.backupNow('schedule')
        .catch(() => {
          failed = true;
        })
        // After a failure, try again within the hour rather than a whole interval later.
        .finally(() => this.arm(Date.now() + Math.min(this.options.everyHours, failed ? 1 : Infinity) * HOUR_MS));
    }, wait);
    this.timer.unref();
  }

  /** Clears the timer and waits for a backup under way. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    this.nextAt = null;
    if (this.running) await this.running.catch(() => undefined);
  }
}
