/**
 * `npm run bench [name…]`: runs every tests/bench/*.bench.ts (or the named ones) in one process, one
 * after another, so ratios printed side by side were measured under the same machine load.
 * Each bench module exports `run(): Promise<void>` and prints its own tables.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => wanted.length === 0 || wanted.some((w) => f.startsWith(w)))
  .sort();

for (const file of files) {
  console.log(`\n## ${file.replace('.bench.ts', '')}\n`);
  const mod = (await import(pathToFileURL(join(here, file)).href)) as { run: () => Promise<void> };
  await mod.run();
}
