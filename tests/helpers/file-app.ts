/**
 * A test app on a real SQLite file (WAL, as in production) in a temp folder, for backup tests:
 * an in-memory database has no file and no `-wal` for a backup to miss.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import type { Express } from 'express';
import { createApp } from '../../server/app';
import type { Deps } from '../../server/deps';
import { DEMO_PASSWORD, DEMO_PICKERS, DEMO_PIN, DEMO_USERS, seedDemoIfEmpty } from '../../server/seed/demo';
import { csrf, makeDeps } from './app';

export type Agent = ReturnType<typeof request.agent>;

export const tempDir = (tag: string): string => mkdtempSync(join(tmpdir(), `aislewright-${tag}-`));

/** Deps over the database file (migrated); seeds the demo users when `seed` is set and it is empty. */
export async function fileDeps(file: string, seed = true): Promise<Deps> {
  const deps = await makeDeps(file);
  if (seed) await seedDemoIfEmpty(deps.db, deps.hasher, []);
  return deps;
}

export async function signIn(app: Express, role: 'admin' | 'supervisor' | 'engineer' | 'picker' | 'picker2'): Promise<Agent> {
  const agent = request.agent(app);
  const res =
    role === 'picker' || role === 'picker2'
      ? await agent
          .post('/api/auth/badge-sign-in')
          .set(csrf)
          .send({ badge: DEMO_PICKERS[role === 'picker' ? 0 : 1].badge, pin: DEMO_PIN })
      : await agent
          .post('/api/auth/sign-in')
          .set(csrf)
          .send({ email: DEMO_USERS.find((u) => u.role === role)!.email, password: DEMO_PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

export function appOf(deps: Deps): Express {
  return createApp(deps);
}
