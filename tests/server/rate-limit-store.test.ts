/** The database-backed sign-in rate-limit store (shared by instances on one PostgreSQL). */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Options } from 'express-rate-limit';
import type { Db } from '../../server/db/knex';
import { migrateLatest } from '../../server/db/knex';
import { DbRateLimitStore } from '../../server/http/rate-limit-store';
import { dropTestDb, openTestDb } from '../helpers/app';

let db: Db;
beforeAll(async () => {
  db = await openTestDb();
  await migrateLatest(db);
});
afterAll(() => dropTestDb(db));

describe('DbRateLimitStore', () => {
  it('counts hits per key within the window, and starts again at 1 once the window ended', async () => {
    let t = 1_000_000;
    const store = new DbRateLimitStore(db, 'test:', () => t);
    store.init({ windowMs: 60_000 } as Options);
    expect((await store.increment('10.0.0.1')).totalHits).toBe(1);
    expect((await store.increment('10.0.0.1')).totalHits).toBe(2);
    const third = await store.increment('10.0.0.1');
    expect(third.totalHits).toBe(3);
    expect(third.resetTime!.getTime()).toBe(1_000_000 + 60_000);
    expect((await store.increment('10.0.0.2')).totalHits).toBe(1);
    await store.decrement('10.0.0.1');
    expect((await store.get('10.0.0.1'))!.totalHits).toBe(2);
    t += 60_000;
    expect(await store.get('10.0.0.1')).toBeUndefined();
    const fresh = await store.increment('10.0.0.1');
    expect(fresh.totalHits).toBe(1);
    expect(fresh.resetTime!.getTime()).toBe(t + 60_000);
  });

  it('sees the hits another store on the same database counted (as a second instance would)', async () => {
    const a = new DbRateLimitStore(db, 'shared:');
    const b = new DbRateLimitStore(db, 'shared:');
    a.init({ windowMs: 60_000 } as Options);
    b.init({ windowMs: 60_000 } as Options);
    await Promise.all(Array.from({ length: 10 }, (_v, i) => (i % 2 ? a : b).increment('10.0.0.9')));
    expect((await b.increment('10.0.0.9')).totalHits).toBe(11);
    await a.resetKey('10.0.0.9');
    expect(await b.get('10.0.0.9')).toBeUndefined();
  });
});
