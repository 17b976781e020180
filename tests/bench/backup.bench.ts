/**
 * Backup time and size: the demo database, and a site of 50,000 bins and 100,000 pick lines
 * (tests/bench/site-50k.ts). Each backup is the same online copy the server and CLI make
 * (SQLite's backup API), then `verify` (integrity check and row counts), timed apart.
 */
import { mkdirSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { backupDatabase, verifyBackup } from '../../server/backups/sqlite-backup';
import { createHasher } from '../../server/auth/hasher';
import { migrateLatest, openDb } from '../../server/db/knex';
import { seedDemoIfEmpty } from '../../server/seed/demo';
import { demoSeeders } from '../../server/seed/seeders';
import { generateLargeSite } from './site-50k';

const MiB = 1024 * 1024;
const dir = join(process.cwd(), 'test-results', 'bench-backup');

async function measure(label: string, file: string): Promise<void> {
  const runs: number[] = [];
  let bytes = 0;
  for (let i = 0; i < 3; i++) {
    const out = join(dir, `${label}-copy-${i}.sqlite`);
    const r = await backupDatabase(file, out);
    runs.push(r.ms);
    bytes = r.bytes;
    if (i > 0) rmSync(out);
  }
  const t0 = performance.now();
  const check = verifyBackup(join(dir, `${label}-copy-0.sqlite`));
  const verifyMs = performance.now() - t0;
  if (!check.ok) throw new Error(`${label}: backup failed its check: ${check.problems.join('; ')}`);
  const src = statSync(file).size;
  runs.sort((a, b) => a - b);
  console.log(
    `| ${label} | ${(src / MiB).toFixed(1)} MiB | ${(bytes / MiB).toFixed(1)} MiB | ${runs[1]!.toFixed(0)} ms (min ${runs[0]!.toFixed(0)}, max ${runs[2]!.toFixed(0)}) | ${verifyMs.toFixed(0)} ms | ${check.tables.floor_plan_bins ?? 0} bins, ${check.tables.pick_lines ?? 0} pick lines |`,
  );
}

export async function run(): Promise<void> {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const demo = join(dir, 'demo.sqlite');
  const db = openDb(demo);
  await migrateLatest(db);
  await seedDemoIfEmpty(db, createHasher({ memoryCost: 1024, timeCost: 1 }), demoSeeders);
  await db.destroy();
  const large = join(dir, 'large.sqlite');
  const g0 = performance.now();
  const made = await generateLargeSite(large);
  console.log(`generated the large site in ${((performance.now() - g0) / 1000).toFixed(1)} s: ${made.bins} bins, ${made.pickLines} pick lines\n`);
  console.log('| database | file | backup | backup time (median of 3) | verify | rows |');
  console.log('|---|---|---|---|---|---|');
  await measure('demo', demo);
  await measure('large', large);
}
