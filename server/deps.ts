import type { Logger } from 'pino';
import type { Config } from './config';
import type { Db } from './db/knex';
import type { Mailer } from './mail/mailer';
import type { Hasher } from './auth/hasher';
import type { SignInBackoff } from './auth/backoff';
import type { Background } from './system/background';
import type { BoardStreams } from './picking/board-streams';
import type { BackupRunner } from './backups/backup-runner';
import type { EventHub } from './events/hub';
import type { JobRunner } from './workers/jobs';

/** Everything the app needs, built in main.ts (or a test helper) and passed to createApp. */
export interface Deps {
  config: Config;
  db: Db;
  mailer: Mailer;
  hasher: Hasher;
  /** Sign-in back-off and attempt limits, kept in the database. */
  backoff: SignInBackoff;
  background: Background;
  /** This app's event hub: in-process on SQLite, LISTEN/NOTIFY between instances on PostgreSQL. */
  events: EventHub;
  /**
   * Heavy jobs (wave previews, studies, slotting runs, plan builds): in memory on SQLite, queued in
   * PostgreSQL (pg-boss) with several instances. createApp registers the kinds.
   */
  jobs: JobRunner;
  jwtSecret: string;
  logger: Logger;
  version: string;
  /** The live board's event streams of this app (one snapshot per change per site, shared). */
  boardStreams: BoardStreams;
  /** Backups of the SQLite file; absent for an in-memory database (and on PostgreSQL). */
  backups?: BackupRunner;
}
