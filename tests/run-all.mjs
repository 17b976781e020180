#!/usr/bin/env node
// `npm test`: unit and API tests (Vitest), then browser tests (Playwright on Debian's Chromium).
// Without Chromium the browser tests are counted as skipped and the install command is printed —
// never silently passed. Ends with one line: `N passed, N failed, N skipped`.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';

const chromium = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
mkdirSync('test-results', { recursive: true });
let passed = 0;
let failed = 0;
let skipped = 0;

const run = (cmd, args) => spawnSync(cmd, args, { stdio: 'inherit', env: process.env });

// Unit, engine and API tests.
run('npx', ['vitest', 'run', '--reporter=default', '--reporter=json', '--outputFile.json=test-results/vitest.json']);
if (existsSync('test-results/vitest.json')) {
  const r = JSON.parse(readFileSync('test-results/vitest.json', 'utf8'));
  passed += r.numPassedTests;
  // A file that failed without a failing test (an error in a hook or at import: its tests skipped) is one failure.
  const brokenFiles = (r.testResults ?? []).filter((f) => f.status === 'failed' && !(f.assertionResults ?? []).some((a) => a.status === 'failed')).length;
  failed += r.numFailedTests + brokenFiles;
  if (r.numTotalTests === 0) failed += 1;
  skipped += r.numPendingTests + r.numTodoTests;
} else {
  console.error('vitest wrote no results');
  failed += 1;
}

// Browser tests.
if (!existsSync(chromium)) {
  const listed = spawnSync('npx', ['playwright', 'test', '--list', '--reporter=json'], { encoding: 'utf8' });
  let n = 0;
  try {
    const walk = (s) => (s.specs ?? []).reduce((a, sp) => a + sp.tests.length, 0) + (s.suites ?? []).reduce((a, c) => a + walk(c), 0);
    n = JSON.parse(listed.stdout).suites.reduce((a, s) => a + walk(s), 0);
  } catch {
    n = 1;
  }
  skipped += n;
  console.log(`\nBrowser tests SKIPPED (${n}): no Chromium at ${chromium}. Install it with: apt-get install -y chromium`);
} else {
  if (!existsSync('dist/client/index.html')) run('npx', ['vite', 'build']);
  run('npx', ['playwright', 'test']);
  if (existsSync('test-results/e2e.json')) {
    const s = JSON.parse(readFileSync('test-results/e2e.json', 'utf8')).stats;
    passed += s.expected;
    failed += s.unexpected + (s.flaky ?? 0);
    skipped += s.skipped;
  } else {
    console.error('playwright wrote no results');
    failed += 1;
  }
}

run('node', ['tests/list-failures.mjs', 'test-results/vitest.json', 'test-results/e2e.json']);
console.log(`\n${passed} passed, ${failed} failed, ${skipped} skipped`);
process.exit(failed > 0 ? 1 : 0);
