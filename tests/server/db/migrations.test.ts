/**
 * Every migration runs up, all the way down and up again on a fresh in-memory SQLite: each `down`
 * must undo its `up` exactly, or the second `up` fails on a table or column that is still there.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openDb, type Db } from '../../../server/db/knex';
import { migrationSource } from '../../../server/db/migration-source';

/** Tables the application made (SQLite's own and Knex's bookkeeping tables left out). */
async function appTables(db: Db): Promise<string[]> {
  const rows: { name: string }[] = await db('sqlite_master')
    .where({ type: 'table' })
    .whereNot('name', 'like', 'sqlite_%')
    .whereNot('name', 'like', 'knex_migrations%')
    .orderBy('name')
    .select('name');
  return rows.map((r) => r.name);
}

/** Every column of every table, as `table.column type notnull default pk`, and every index, for an exact comparison. */
async function schemaOf(db: Db): Promise<string[]> {
  const out: string[] = [];
  for (const table of await appTables(db)) {
    const cols: { name: string; type: string; notnull: number; dflt_value: unknown; pk: number }[] = await db.raw(`PRAGMA table_info("${table}")`);
    for (const c of cols) out.push(`${table}.${c.name} ${c.type} ${c.notnull} ${String(c.dflt_value)} ${c.pk}`);
  }
  const idx: { name: string; sql: string | null }[] = await db('sqlite_master')
    .whereIn('type', ['index', 'trigger', 'view'])
    .whereNot('name', 'like', 'sqlite_%')
    .orderBy('name')
    .select('name', 'sql');
  for (const i of idx) out.push(`${i.name}: ${i.sql ?? ''}`);
  return out;
}

/** The tables the migration files create, read from their text: the schema the database must hold. */
function tablesNamedIn(files: string[]): string[] {
  const names = new Set<string>();
  for (const f of files) {
    const text = readFileSync(join(import.meta.dirname, '..', '..', '..', 'migrations', f), 'utf8');
    for (const m of text.matchAll(/createTable\(\s*['"]([a-z0-9_]+)['"]/g)) names.add(m[1]!);
  }
  return [...names].sort();
}

describe('migrations, up → down → up', () => {
  let db: Db;
  beforeEach(() => {
    db = openDb(':memory:');
  });
  afterEach(async () => {
    await db.destroy();
  });

  it('runs every migration up, rolls them all back to an empty database, and runs them up again to the same schema', async () => {
    const files = await migrationSource.getMigrations([]);
    expect(files.length).toBeGreaterThan(0);

    const [, applied] = (await db.migrate.latest({ migrationSource })) as [number, string[]];
    expect(applied).toEqual(files);
    const tables = await appTables(db);
    expect(tables).toEqual(tablesNamedIn(files));
    for (const t of ['users', 'sites', 'floor_plans', 'orders', 'waves', 'trips']) expect(tables).toContain(t);
    const schema = await schemaOf(db);

    const [, rolledBack] = (await db.migrate.rollback({ migrationSource }, true)) as [number, string[]];
    expect([...rolledBack].sort()).toEqual(files);
    expect(await appTables(db)).toEqual([]);
    const [done] = (await db.migrate.list({ migrationSource })) as [unknown[], unknown[]];
    expect(done).toEqual([]);

    const [, again] = (await db.migrate.latest({ migrationSource })) as [number, string[]];
    expect(again).toEqual(files);
    expect(await appTables(db)).toEqual(tables);
    expect(await schemaOf(db)).toEqual(schema);
  });

  it('undoes each migration exactly: one step down gives back the schema of one step up before it', async () => {
    const files = await migrationSource.getMigrations([]);
    expect(files.length).toBeGreaterThan(0);
    const before: string[][] = [await schemaOf(db)];
    for (const f of files) {
      const [, ran] = (await db.migrate.up({ migrationSource })) as [number, string[]];
      expect(ran).toEqual([f]);
      before.push(await schemaOf(db));
    }
    for (let k = files.length; k >= 1; k--) {
      const [, undone] = (await db.migrate.down({ migrationSource })) as [number, string[]];
      expect(undone, `down of ${files[k - 1]}`).toEqual([files[k - 1]]);
      expect(await schemaOf(db), `schema after the down of ${files[k - 1]}`).toEqual(before[k - 1]);
    }
    expect(await appTables(db)).toEqual([]);
  });
});
