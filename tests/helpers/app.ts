/**
 * A fresh app per test file: in-memory SQLite — or, when TEST_DATABASE_URL names a PostgreSQL server,
 * a fresh schema of its own there — with the real migrations (through the same explicit
 * migration source production uses), a cheap hasher, the demo users seeded, and a signed-in
 * Supertest agent per role.
 */
import { randomBytes } from 'node:crypto';
import { pino } from 'pino';
import request from 'supertest';
import type { Express } from 'express';
import { createApp } from '../../server/app';
import { SignInBackoff } from '../../server/auth/backoff';
import { createHasher } from '../../server/auth/hasher';
import { loadConfig } from '../../server/config';
import type { Deps } from '../../server/deps';
import { migrateLatest, openDb, type Db } from '../../server/db/knex';
import { createMailer } from '../../server/mail/mailer';
import { createBackground } from '../../server/system/background';
import { createBoardStreams } from '../../server/picking/board-streams';
import { createLocalHub } from '../../server/events/hub';
import { createLocalJobRunner, type JobRunner } from '../../server/workers/jobs';
import { createPgJobRunner } from '../../server/workers/pg-jobs';
import { DEMO_PASSWORD, DEMO_PICKERS, DEMO_PIN, DEMO_USERS, seedDemoIfEmpty, type DemoSeeder } from '../../server/seed/demo';
import { CSRF_HEADER, CSRF_VALUE, type Role } from '../../shared/common';

export interface TestApp {
  app: Express;
  deps: Deps;
  /** Signed-in agents; `picker` is badge P-1001, `picker2` is P-1002. */
  as: Record<Role | 'picker2', ReturnType<typeof request.agent>>;
  anon: ReturnType<typeof request.agent>;
  siteId: number;
  close(): Promise<void>;
}

/** Test-only argon2 cost: the same algorithm, less memory, so suites stay fast. */
const testHasher = () => createHasher({ memoryCost: 1024, timeCost: 1 });

/** The PostgreSQL server API tests run against, when set (`.ci/run` sets it for its second run). */
export const testDatabaseUrl = process.env.TEST_DATABASE_URL || undefined;

const schemas = new WeakMap<Db, string>();

/**
 * An empty database for one test app: `:memory:` SQLite, or a new schema on TEST_DATABASE_URL
 * (dropped by `dropTestDb`).
 */
export async function openTestDb(): Promise<Db> {
  if (!testDatabaseUrl) return openDb(':memory:');
  const schema = `t_${randomBytes(6).toString('hex')}`;
  const admin = openDb(testDatabaseUrl, { poolMax: 1 });
  await admin.raw(`create schema ${schema}`);
  await admin.destroy();
  const db = openDb(testDatabaseUrl, { schema, poolMax: 5 });
  schemas.set(db, schema);
  return db;
}

/** Closes a test database; on PostgreSQL drops its schema too. */
export async function dropTestDb(db: Db): Promise<void> {
  const schema = schemas.get(db);
  if (schema) await db.raw(`drop schema if exists ${schema}_boss cascade`);
  if (schema) await db.raw(`drop schema ${schema} cascade`);
  await db.destroy();
}

/** Deps over a fresh test database (see openTestDb), or over `file` (a real SQLite file, WAL as in production). */
export async function makeDeps(file = ':memory:'): Promise<Deps> {
  const db = file === ':memory:' ? await openTestDb() : openDb(file);
  await migrateLatest(db);
  const logger = pino({ level: process.env.TEST_LOG_LEVEL ?? 'silent' });
  const events = createLocalHub();
  const schema = schemas.get(db);
  // On PostgreSQL the jobs go through pg-boss, in a schema beside the test file's own.
  const jobs: JobRunner =
    schema && testDatabaseUrl
      ? await createPgJobRunner({ db, url: testDatabaseUrl, bossSchema: `${schema}_boss`, events, logger })
      : createLocalJobRunner(events, logger);
  return {
    config: loadConfig({ DATABASE_FILE: file, PUBLIC_URL: 'http://aislewright.test', LOG_LEVEL: 'silent' }),
    db,
    hasher: testHasher(),
    backoff: new SignInBackoff(db),
    background: createBackground(logger),
    events,
    jobs,
    mailer: createMailer(db, { from: 'Aislewright <no-reply@aislewright.invalid>' }),
    jwtSecret: 'test-secret-that-is-long-enough-for-256-bits-0123456789',
    logger,
    version: 'test',
    boardStreams: createBoardStreams(db, logger),
  };
}

/** Adds the CSRF header every unsafe request from our client carries. */
export const csrf = { [CSRF_HEADER]: CSRF_VALUE } as const;

export async function makeTestApp(options: { seeders?: DemoSeeder[] } = {}): Promise<TestApp> {
  const deps = await makeDeps();
  await seedDemoIfEmpty(deps.db, deps.hasher, options.seeders ?? []);
  const app = createApp(deps);
  const siteId = (await deps.db('sites').first<{ id: number }>('id'))!.id;
  const signIn = async (path: string, body: object) => {
    const agent = request.agent(app);
    const res = await agent.post(path).set(csrf).send(body);
    if (res.status !== 200) throw new Error(`test sign-in failed: ${res.status} ${JSON.stringify(res.body)}`);
    return agent;
  };
  const byRole = (role: string) => DEMO_USERS.find((u) => u.role === role)!.email;
  const as = {
    admin: await signIn('/api/auth/sign-in', { email: byRole('admin'), password: DEMO_PASSWORD }),
    supervisor: await signIn('/api/auth/sign-in', { email: byRole('supervisor'), password: DEMO_PASSWORD }),
    engineer: await signIn('/api/auth/sign-in', { email: byRole('engineer'), password: DEMO_PASSWORD }),
    picker: await signIn('/api/auth/badge-sign-in', { badge: DEMO_PICKERS[0].badge, pin: DEMO_PIN }),
    picker2: await signIn('/api/auth/badge-sign-in', { badge: DEMO_PICKERS[1].badge, pin: DEMO_PIN }),
  };
  return {
    app,
    deps,
    as,
    anon: request.agent(app),
    siteId,
    close: async () => {
      deps.boardStreams.close();
      await deps.jobs.close();
      return dropTestDb(deps.db);
    },
  };
}
