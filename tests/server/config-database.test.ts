/** Choosing the database from the environment: SQLite by default, PostgreSQL with DATABASE_URL. */
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { openDb } from '../../server/db/knex';
import { dialectOf, isPgUrl } from '../../server/db/dialect';

const SECRET = 'x'.repeat(43);

describe('database configuration', () => {
  it('uses the SQLite file when DATABASE_URL is unset', () => {
    const c = loadConfig({});
    expect(c.DATABASE_URL).toBeUndefined();
    expect(c.DATABASE_FILE).toBe('data/aislewright.sqlite');
  });

  it('refuses DATABASE_URL without JWT_SECRET, naming the variable', () => {
    expect(() => loadConfig({ DATABASE_URL: 'postgres://u@127.0.0.1:5432/aw' })).toThrow(/JWT_SECRET/);
    expect(loadConfig({ DATABASE_URL: 'postgres://u@127.0.0.1:5432/aw', JWT_SECRET: SECRET }).DATABASE_URL).toBe('postgres://u@127.0.0.1:5432/aw');
  });

  it('refuses a DATABASE_URL that is not PostgreSQL, naming it', () => {
    expect(() => loadConfig({ DATABASE_URL: 'mysql://u@h/db', JWT_SECRET: SECRET })).toThrow(/DATABASE_URL/);
  });

  it('opens PostgreSQL through the pg driver for a postgres:// target, SQLite otherwise', async () => {
    expect(isPgUrl('postgresql://u@h/db')).toBe(true);
    expect(isPgUrl('data/aislewright.sqlite')).toBe(false);
    // Knex connects lazily: no server is needed to see which driver a handle uses.
    const pg = openDb('postgres://u@127.0.0.1:1/none');
    const lite = openDb(':memory:');
    expect(dialectOf(pg)).toBe('pg');
    expect(dialectOf(lite)).toBe('sqlite');
    await Promise.all([pg.destroy(), lite.destroy()]);
  });
});
