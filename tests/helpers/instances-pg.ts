/**
 * Real app instances for the several-instances test: each one is `server/main.ts` in a child process
 * (its own event hub, job queue and caches, as on separate machines), all on one fresh PostgreSQL
 * database created on TEST_DATABASE_URL's server and dropped afterwards.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { createServer } from 'node:net';
import { openDb, type Db } from '../../server/db/knex';

export interface Instance {
  url: string;
  port: number;
  child: ChildProcess;
  output: () => string;
  kill(signal?: NodeJS.Signals): Promise<void>;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

/** A new, empty database on the test server; returns its URL and a function that drops it. */
export async function freshDatabase(serverUrl: string): Promise<{ url: string; db: Db; drop(): Promise<void> }> {
  const name = `aw_${randomBytes(5).toString('hex')}`;
  const admin = openDb(serverUrl, { poolMax: 1 });
  await admin.raw(`create database ${name}`);
  const u = new URL(serverUrl);
  u.pathname = `/${name}`;
  const db = openDb(u.toString(), { poolMax: 2 });
  return {
    url: u.toString(),
    db,
    async drop() {
      await db.destroy();
      await admin.raw(`drop database if exists ${name} with (force)`);
      await admin.destroy();
    },
  };
}

export const TEST_JWT_SECRET = 'several-instances-test-secret-0123456789abcdefghijklmnop';

/** Starts `server/main.ts` on a free port with DATABASE_URL; resolves once /api/health answers. */
export async function startInstance(databaseUrl: string, env: Record<string, string> = {}): Promise<Instance> {
  const port = await freePort();
  let out = '';
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    env: { ...process.env, DATABASE_URL: databaseUrl, JWT_SECRET: TEST_JWT_SECRET, PORT: String(port), HOST: '127.0.0.1', LOG_LEVEL: 'warn', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (b: Buffer) => (out += b.toString()));
  child.stderr!.on('data', (b: Buffer) => (out += b.toString()));
  const url = `http://127.0.0.1:${port}`;
  const inst: Instance = {
    url,
    port,
    child,
    output: () => out,
    kill: (signal = 'SIGTERM') =>
      new Promise((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill(signal);
      }),
  };
  const deadline = Date.now() + 120_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`instance exited (${child.exitCode}):\n${out}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) return inst;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  await inst.kill('SIGKILL');
  throw new Error(`instance did not answer in 120 s:\n${out}`);
}
