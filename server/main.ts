/** Start-up: config → secret → database → migrations → demo seed → app → listen. */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { createServer as createHttpsServer } from 'node:https';
import type { Server } from 'node:net';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { pino } from 'pino';
import { createApp } from './app';
import { SignInBackoff } from './auth/backoff';
import { createHasher } from './auth/hasher';
import { loadConfig } from './config';
import { migrateLatest, openDb } from './db/knex';
import { createLocalHub, createPgHub } from './events/hub';
import { createLocalJobRunner } from './workers/jobs';
import { createPgJobRunner } from './workers/pg-jobs';
import { createMailer } from './mail/mailer';
import { createBackground } from './system/background';
import { createBoardStreams } from './picking/board-streams';
import { BackupRunner } from './backups/backup-runner';
import { backupDirOf } from './backups/backups.service';
import { claimDatabase } from './backups/sqlite-backup';
import { startTasks } from './tasks/schedule';
import { demoSeeders } from './seed/seeders';
import { seedDemoIfEmpty } from './seed/demo';
import { VERSION } from './version';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

/** JWT_SECRET from the environment, or one generated into the data folder on first start. */
function jwtSecret(explicit: string | undefined, dataDir: string): string {
  if (explicit) return explicit;
  const file = join(dataDir, 'jwt-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(48).toString('base64url');
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

async function main(): Promise<void> {
  let config;
  try {
    config = loadConfig();
  } catch (err) {
    console.error((err as Error).message);
    process.exit(1);
  }
  const logger = pino({ level: config.LOG_LEVEL, redact: ['req.headers.cookie', 'req.headers.authorization', '*.password', '*.pin', '*.token'] });
  const dbFile = config.DATABASE_FILE === ':memory:' ? ':memory:' : resolve(config.DATABASE_FILE);
  // DATABASE_URL (postgres://…) selects PostgreSQL; otherwise the SQLite file.
  const db = openDb(config.DATABASE_URL ?? dbFile);
  await migrateLatest(db);
  // `aislewright backup restore` refuses while this claim is held by a live process.
  const releaseDatabase = config.DATABASE_URL || dbFile === ':memory:' ? () => undefined : claimDatabase(dbFile);
  // Several instances: live-board and job events travel between them through LISTEN/NOTIFY, and heavy
  // jobs through a queue in PostgreSQL (pg-boss, schema "pgboss"); one SQLite process keeps both in memory.
  const events = config.DATABASE_URL ? await createPgHub(config.DATABASE_URL, (err) => logger.warn({ err }, 'event hub connection')) : createLocalHub();
  const jobs = config.DATABASE_URL
    ? await createPgJobRunner({ db, url: config.DATABASE_URL, bossSchema: 'pgboss', events, logger })
    : createLocalJobRunner(events, logger);
  const hasher = createHasher();
  const mailer = createMailer(db, { smtpUrl: config.SMTP_URL, from: config.MAIL_FROM });
  // Backups copy the SQLite file; on PostgreSQL the site backs up with pg_dump (README).
  const backups =
    config.DATABASE_URL || dbFile === ':memory:'
      ? undefined
      : new BackupRunner({
          dbFile,
          dir: backupDirOf(dbFile, config.BACKUP_DIR),
          everyHours: config.BACKUP_EVERY_HOURS,
          keep: config.BACKUP_KEEP,
          db,
          mailer,
          logger,
          publicUrl: config.publicUrl,
        });
  const deps = {
    config,
    db,
    hasher,
    backoff: new SignInBackoff(db),
    background: createBackground(logger),
    events,
    jobs,
    mailer,
    jwtSecret: jwtSecret(config.JWT_SECRET, dbFile === ':memory:' ? join(root, 'data') : dirname(dbFile)),
    logger,
    version: VERSION,
    boardStreams: createBoardStreams(db, logger),
    ...(backups ? { backups } : {}),
  };
  const seeded = config.DEMO_SEED ? await seedDemoIfEmpty(db, hasher, demoSeeders) : null;
  const app = createApp(deps, { clientDir: join(root, 'dist', 'client') });
  // HTTPS when a certificate and key are given (README, "HTTPS for tablets"); plain HTTP otherwise.
  let tls: { cert: Buffer; key: Buffer } | null = null;
  if (config.TLS_CERT_FILE && config.TLS_KEY_FILE) {
    try {
      tls = { cert: readFileSync(resolve(config.TLS_CERT_FILE)), key: readFileSync(resolve(config.TLS_KEY_FILE)) };
    } catch (err) {
      console.error(`Cannot read the TLS certificate or key: ${(err as Error).message}`);
      process.exit(1);
    }
  }
  const onListening = () => {
    const url = `${tls ? 'https' : 'http'}://localhost:${config.PORT}`;
    console.log(`\nAislewright ${VERSION} is serving on ${url}`);
    if (seeded) {
      console.log('\nDemo site seeded (invented data). Demo sign-ins:');
      for (const s of seeded) console.log(`  ${s.role.padEnd(10)} ${s.name.padEnd(14)} ${s.signIn.padEnd(34)} ${s.secret}`);
      console.log(`  (pickers: open ${url}/sign-in/badge on the tablet)`);
    }
    console.log('');
  };
  let server: Server;
  try {
    server = tls ? createHttpsServer(tls, app).listen(config.PORT, config.HOST, onListening) : app.listen(config.PORT, config.HOST, onListening);
  } catch (err) {
    // A key that does not match the certificate, or a file that is not PEM.
    console.error(`Cannot start HTTPS with TLS_CERT_FILE and TLS_KEY_FILE: ${(err as Error).message}`);
    process.exit(1);
  }
  const tasks = startTasks(deps);
  const stop = () => {
    server.close(
      () =>
        void tasks
          .stop()
          .then(() => deps.background.settled())
          .then(() => jobs.close())
          .then(() => events.close())
          .then(() => db.destroy())
          .then(() => {
            releaseDatabase();
            process.exit(0);
          }),
    );
    setTimeout(() => {
      releaseDatabase();
      process.exit(0);
    }, 3000).unref();
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

await main();
