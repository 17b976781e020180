import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Db } from '../../../server/db/knex';
import { dropTestDb, openTestDb } from '../../helpers/app';
import { GroupCommit } from '../../../server/picking/group-commit';

let db: Db;
beforeAll(async () => {
  db = await openTestDb();
  await db.schema.createTable('t', (t) => {
    t.increments('id');
    t.string('v').notNullable().unique();
  });
});
afterAll(() => dropTestDb(db));

describe('GroupCommit', () => {
  it('commits writes that arrive together in one transaction, each answered with its own result', async () => {
    const g = new GroupCommit(db);
    const results = await Promise.all(['a', 'b', 'c', 'd'].map((v) => g.run(async (trx) => (await trx('t').insert({ v }, 'id'))[0].id)));
    expect(results).toHaveLength(4);
    expect(await db('t').orderBy('id').pluck('v')).toEqual(['a', 'b', 'c', 'd']);
    // The first runs alone (nothing else was waiting); the three queued behind it share the next commit.
    expect(g.sizes).toEqual([1, 3]);
  });

  it('rolls back only the failing write of a group', async () => {
    const g = new GroupCommit(db);
    const settled = await Promise.allSettled([
      g.run((trx) => trx('t').insert({ v: 'e' })),
      g.run((trx) => trx('t').insert({ v: 'f' })),
      g.run(async (trx) => {
        await trx('t').insert({ v: 'g' });
        await trx('t').insert({ v: 'a' }); // duplicate: this unit fails, and its 'g' goes with it
      }),
      g.run((trx) => trx('t').insert({ v: 'h' })),
    ]);
    expect(settled.map((s) => s.status)).toEqual(['fulfilled', 'fulfilled', 'rejected', 'fulfilled']);
    expect(await db('t').whereIn('v', ['e', 'f', 'g', 'h']).orderBy('v').pluck('v')).toEqual(['e', 'f', 'h']);
  });
});
