/**
 * `npm run migrate`: runs pending migrations on DATABASE_URL (PostgreSQL) or DATABASE_FILE (SQLite) and
 * exits. Run it once before starting several instances; instances also migrate at start, under Knex's
 * migration lock, so two starting together still run each migration once.
 */
import { resolve } from 'node:path';
import { isPgUrl } from './dialect';
import { migrateLatest, openDb } from './knex';

// Only the database variables matter here (no JWT_SECRET needed to migrate).
const url = process.env.DATABASE_URL || undefined;
if (url && !isPgUrl(url)) {
  console.error('Configuration error:\n  DATABASE_URL: must start with postgres:// (unset it to use the SQLite file)');
  process.exit(1);
}
const db = openDb(url ?? resolve(process.env.DATABASE_FILE || 'data/aislewright.sqlite'));
try {
  const [, pending] = (await db.migrate.list({ migrationSource: (await import('./migration-source')).migrationSource })) as [unknown[], unknown[]];
  await migrateLatest(db);
  console.log(`migrations: ${pending.length} applied, database up to date`);
} finally {
  await db.destroy();
}
