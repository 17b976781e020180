/**
 * Several app instances started at once on an empty PostgreSQL database each run the migrations on
 * start. Regression: the second one failed with "relation knex_migrations already exists" (both
 * created Knex's bookkeeping tables; seen when the two-instance test started its pair together).
 * Runs only with TEST_DATABASE_URL (a PostgreSQL server), as the other PostgreSQL tests.
 */
import { describe, expect, it } from 'vitest';
import { migrateLatest, openDb } from '../../../server/db/knex';
import { testDatabaseUrl } from '../../helpers/app';
import { freshDatabase } from '../../helpers/instances-pg';

describe.skipIf(!testDatabaseUrl)('migrations started by several instances at once (PostgreSQL)', () => {
  it('four instances migrating one empty database together all succeed, and each migration runs once', async () => {
    for (let round = 0; round < 3; round++) {
      const fresh = await freshDatabase(testDatabaseUrl!);
      const instances = Array.from({ length: 4 }, () => openDb(fresh.url, { poolMax: 4 }));
      try {
        const results = await Promise.allSettled(instances.map((db) => migrateLatest(db)));
        expect(results.map((r) => (r.status === 'rejected' ? String(r.reason) : 'ok'))).toEqual(['ok', 'ok', 'ok', 'ok']);
        const runs: { name: string; n: string | number }[] = await fresh.db('knex_migrations').select('name').count({ n: '*' }).groupBy('name');
        expect(runs.length).toBeGreaterThan(10);
        expect(runs.every((r) => Number(r.n) === 1)).toBe(true);
      } finally {
        await Promise.all(instances.map((db) => db.destroy()));
        await fresh.drop();
      }
    }
  }, 180_000);
});
