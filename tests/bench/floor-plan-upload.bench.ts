/**
 * Upload to draft through the real HTTP stack (createApp on a file database, multipart upload, the
 * check and build workers, chunked saving), for the template and for 20,000- and 50,000-bin
 * workbooks; meanwhile GET /api/health is timed every 25 ms, showing whether the build blocks other
 * requests, and the server's own event-loop delay is sampled. Prints one row per workbook.
 */
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { AddressInfo } from 'node:net';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { generateRectangularPlan, type RectangularPlanParams } from '../../server/core/plan/generate';
import { buildFloorPlanTemplate, floorPlanToWorkbook } from '../../server/floor-plans/import';
import { FloorPlanDetail, FloorPlanJob } from '../../shared/floor-plans';
import { createApp } from '../../server/app';
import { DEMO_PASSWORD, seedDemoIfEmpty } from '../../server/seed/demo';
import { makeDeps } from '../helpers/app';
import { migrateLatest, openDb } from '../../server/db/knex';
import { CSRF_HEADER, CSRF_VALUE } from '../../shared/common';

const threeCrossAisles = { front: true, back: true, middle: 1 };
const plans: { name: string; params: RectangularPlanParams | null }[] = [
  { name: 'template', params: null },
  {
    name: '20k bins (40 aisles × 50 bays × 5 levels × 2 sides)',
    params: { aisles: 40, aisleLengthM: 70, aisleSpacingM: 3.2, baysPerAisle: 50, levels: 5, crossAisles: threeCrossAisles, depot: { at: 'front_left' } },
  },
  {
    name: '50k bins (60 aisles × 105 bays × 4 levels × 2 sides)',
    params: { aisles: 60, aisleLengthM: 140, aisleSpacingM: 3.2, baysPerAisle: 105, levels: 4, crossAisles: threeCrossAisles, depot: { at: 'front_centre' } },
  },
];

const percentile = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))] ?? NaN;
};

export async function run(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'aw-fp-bench-'));
  const file = join(dir, 'bench.sqlite');
  const base = await makeDeps();
  await base.db.destroy();
  const deps = { ...base, db: openDb(file) };
  await migrateLatest(deps.db);
  await seedDemoIfEmpty(deps.db, deps.hasher);
  const siteId = (await deps.db('sites').first<{ id: number }>('id'))!.id;
  const server = createApp(deps).listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  const signIn = await fetch(`${url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', [CSRF_HEADER]: CSRF_VALUE },
    body: JSON.stringify({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD }),
  });
  const cookie = signIn.headers.get('set-cookie')!.split(';')[0]!;

  console.log(
    '| workbook | file | upload → draft | check + build + save phases | stored graph + index | DB file after | health during build: n, median, p95, max | event-loop delay: p99, max |',
  );
  console.log('|---|---|---|---|---|---|---|---|');
  // Baseline: the same probes for 3 s with no build, so the rows below compare against this machine's load.
  {
    const health: number[] = [];
    const lag = monitorEventLoopDelay({ resolution: 5 });
    lag.enable();
    const until = performance.now() + 3000;
    while (performance.now() < until) {
      const t0 = performance.now();
      await fetch(`${url}/api/health`);
      health.push(performance.now() - t0);
      await new Promise((r) => setTimeout(r, 25));
    }
    lag.disable();
    console.log(
      `| (no build, 3 s idle) | | | | | | ${health.length}, ${percentile(health, 50).toFixed(1)} ms, ${percentile(health, 95).toFixed(1)} ms, ${Math.max(...health).toFixed(1)} ms | ${(lag.percentile(99) / 1e6).toFixed(0)} ms, ${(lag.max / 1e6).toFixed(0)} ms |`,
    );
  }
  for (const p of plans) {
    const bytes = p.params ? floorPlanToWorkbook(generateRectangularPlan(p.params)) : buildFloorPlanTemplate();
    const health: number[] = [];
    let building = true;
    const probe = (async () => {
      while (building) {
        const t0 = performance.now();
        await fetch(`${url}/api/health`);
        health.push(performance.now() - t0);
        await new Promise((r) => setTimeout(r, 25));
      }
    })();
    const lag = monitorEventLoopDelay({ resolution: 5 });
    lag.enable();
    const form = new FormData();
    form.append('file', new Blob([new Uint8Array(bytes)]), `${p.name}.xlsx`);
    const t0 = performance.now();
    const res = await fetch(`${url}/api/sites/${siteId}/floor-plans/uploads`, { method: 'POST', headers: { cookie, [CSRF_HEADER]: CSRF_VALUE }, body: form });
    let job = FloorPlanJob.parse(await res.json());
    const phases: string[] = [];
    let last = '';
    while (!job.finishedAt) {
      await new Promise((r) => setTimeout(r, 20));
      job = FloorPlanJob.parse(await (await fetch(`${url}/api/sites/${siteId}/floor-plans/jobs/${job.id}`, { headers: { cookie } })).json());
      if (job.phase !== last) {
        phases.push(`${job.phase}@${Math.round(performance.now() - t0)}`);
        last = job.phase;
      }
    }
    const wall = performance.now() - t0;
    lag.disable();
    building = false;
    await probe;
    if (job.status !== 'done') throw new Error(`${p.name}: ${job.status} ${job.message} ${JSON.stringify(job.errors.slice(0, 3))}`);
    const detail = FloorPlanDetail.parse(await (await fetch(`${url}/api/sites/${siteId}/floor-plans/${job.planId}`, { headers: { cookie } })).json());
    const fileMb = (statSync(file).size + (statSync(`${file}-wal`, { throwIfNoEntry: false })?.size ?? 0)) / 1024 / 1024;
    console.log(
      `| ${p.name} (${detail.stats.bins} bins) | ${(bytes.length / 1024).toFixed(0)} KiB | ${Math.round(wall)} ms (job ${job.totalMs} ms) | ${phases.join(', ')} | ${(detail.storedBytes / 1024).toFixed(0)} KiB | ${fileMb.toFixed(1)} MB | ${health.length}, ${percentile(health, 50).toFixed(1)} ms, ${percentile(health, 95).toFixed(1)} ms, ${Math.max(...health).toFixed(1)} ms | ${(lag.percentile(99) / 1e6).toFixed(0)} ms, ${(lag.max / 1e6).toFixed(0)} ms |`,
    );
  }
  server.close();
  await deps.db.destroy();
  rmSync(dir, { recursive: true, force: true });
}
