#!/usr/bin/env node
// Names every test that failed (or passed only on a retry) in the JSON reports given on the command
// line — Vitest's (`--reporter=json`) and Playwright's — with the first line of its error, so a run's
// last screen says what broke without scrolling back. Prints nothing when nothing failed; a missing or
// unreadable report is named too. Used by `npm test` and `.ci/run` just before their summary line.
import { existsSync, readFileSync } from 'node:fs';
import { relative } from 'node:path';
import { stripVTControlCharacters } from 'node:util';

const firstLine = (s) =>
  // Without the reporters' colour codes.
  stripVTControlCharacters(String(s ?? ''))
    .split('\n')
    .map((l) => l.trim())
    .find((l) => l.length > 0)
    ?.slice(0, 300) ?? '';

/** Vitest's JSON report: failed tests, and files that failed without a failing test (hook or import error). */
function fromVitest(r) {
  const out = [];
  for (const f of r.testResults ?? []) {
    const file = relative(process.cwd(), f.name ?? '');
    const failedTests = (f.assertionResults ?? []).filter((a) => a.status === 'failed');
    for (const a of failedTests) out.push(`${file} › ${a.fullName ?? a.title}: ${firstLine(a.failureMessages?.[0])}`);
    if (f.status === 'failed' && failedTests.length === 0) out.push(`${file} (the file, not one test): ${firstLine(f.message)}`);
  }
  return out;
}

/** Playwright's JSON report: tests whose outcome was unexpected or flaky (passed on a retry). */
function fromPlaywright(r) {
  const out = [];
  const walk = (suite) => {
    for (const spec of suite.specs ?? []) {
      for (const t of spec.tests ?? []) {
        if (t.status !== 'unexpected' && t.status !== 'flaky') continue;
        const error = (t.results ?? []).map((res) => res.error?.message ?? res.errors?.[0]?.message).find(Boolean);
        const how = t.status === 'flaky' ? ' [passed only on a retry]' : '';
        out.push(`${spec.file ?? suite.file ?? ''} › ${t.projectName ? `[${t.projectName}] ` : ''}${spec.title}${how}: ${firstLine(error)}`);
      }
    }
    for (const child of suite.suites ?? []) walk(child);
  };
  for (const s of r.suites ?? []) walk(s);
  for (const e of r.errors ?? []) out.push(`(outside any test): ${firstLine(e.message)}`);
  return out;
}

const lines = [];
for (const path of process.argv.slice(2)) {
  if (!existsSync(path)) continue;
  let report;
  try {
    report = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    lines.push(`${path}: unreadable report (${firstLine(e.message)})`);
    continue;
  }
  lines.push(...(report.config && report.suites ? fromPlaywright(report) : fromVitest(report)).map((l) => `${path}: ${l}`));
}
if (lines.length > 0) {
  console.log(`\nFailed (${lines.length}):`);
  for (const l of lines) console.log(`  ✗ ${l}`);
}
