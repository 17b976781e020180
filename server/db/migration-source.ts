import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Knex } from 'knex';

const migrationsDir = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'migrations');

/**
 * Knex's own loader imports `.ts` with Node's loader, which fails under Vitest (`Unknown file extension ".ts"`);
 * this source lists the folder and imports each file through whatever loader runs us (tsx or Vitest).
 */
export const migrationSource: Knex.MigrationSource<string> = {
  async getMigrations() {
    return readdirSync(migrationsDir)
      .filter((f) => /^\d{14}_[a-z0-9_]+\.ts$/.test(f))
      .sort();
  },
  getMigrationName(name) {
    return name;
  },
  async getMigration(name) {
    return (await import(pathToFileURL(join(migrationsDir, name)).href)) as Knex.Migration;
  },
};
