/**
 * Heavy jobs run in their own processes: a job made to die hard (process.abort(), or allocating until
 * V8 gives up) fails only that job, with a message, and the API keeps answering. The crash is asked
 * for through the test-only AISLEWRIGHT_TEST_JOB_CRASH variable (server/workers/worker-protocol.ts).
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CRASH_TEST_ENV } from '../../server/workers/worker-protocol';
import type { StudyDetail, StudyInputsBody } from '../../shared/studies';
import { csrf, type TestApp } from '../helpers/app';
import { makeDemoApp, previewWave } from '../helpers/waves';

let t: TestApp;
beforeAll(async () => {
  t = await makeDemoApp();
}, 120_000);
afterAll(() => t.close());
afterEach(() => {
  delete process.env[CRASH_TEST_ENV];
});

const study: StudyInputsBody = {
  name: 'Small generated study',
  seed: 3,
  work: {
    kind: 'generated',
    plan: { source: 'active' },
    orders: { waves: 1, ordersPerWave: 8, linesMin: 1, linesMax: 3, skus: 100, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 2 },
    batching: 'savings',
    wavesPerDay: 4,
  },
  routing: ['best+local'],
  batching: ['savings'],
  whatIfs: [],
};

async function studyEnd(id: number): Promise<StudyDetail> {
  for (let i = 0; i < 1200; i++) {
    const res = await t.as.engineer.get(`/api/sites/${t.siteId}/studies/${id}`);
    expect(res.status).toBe(200);
    if (res.body.status !== 'queued' && res.body.status !== 'running') return res.body as StudyDetail;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('study did not end in 120 s');
}

/** The server still answers: its health check, a read of the database, and a signed-in page's data. */
async function expectServing(): Promise<void> {
  const health = await t.anon.get('/api/health');
  expect(health.status).toBe(200);
  expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/orders`)).status).toBe(200);
  expect((await t.as.engineer.get(`/api/sites/${t.siteId}/studies`)).status).toBe(200);
}

describe('a job that dies hard', () => {
  it('fails a study whose process aborts, says why, and the next study runs', async () => {
    process.env[CRASH_TEST_ENV] = 'study.worker.ts:abort';
    const res = await t.as.engineer.post(`/api/sites/${t.siteId}/studies`).set(csrf).send(study);
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const failed = await studyEnd(res.body.id as number);
    expect(failed.status).toBe('failed');
    expect(failed.error).toMatch(/^The study stopped with a fatal error \(.*signal SIGABRT\)/);
    await expectServing();

    delete process.env[CRASH_TEST_ENV];
    const again = await t.as.engineer.post(`/api/sites/${t.siteId}/studies/${res.body.id}/rerun`).set(csrf).send({});
    expect(again.status).toBe(202);
    expect((await studyEnd(again.body.id as number)).status).toBe('done');
  }, 180_000);

  it('fails a wave preview whose process aborts, with a message, and the next preview plans', async () => {
    process.env[CRASH_TEST_ENV] = 'plan.worker.ts:abort';
    const job = await previewWave(t, { orders: 6 });
    expect(job.state).toBe('failed');
    expect(job.error?.code).toBe('planning_failed');
    expect(job.error?.message).toMatch(/^Planning stopped with a fatal error \(.*signal SIGABRT\)/);
    await expectServing();

    delete process.env[CRASH_TEST_ENV];
    const next = await previewWave(t, { orders: 6 });
    expect(next.state, JSON.stringify(next.error)).toBe('done');
  }, 180_000);

  it('answers a closure whose rebuild process aborts with an error, and changes nothing', async () => {
    const planId = (await t.deps.db('floor_plans').where({ site_id: t.siteId, state: 'active' }).first<{ id: number }>('id'))!.id;
    const before = await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${planId}`);
    process.env[CRASH_TEST_ENV] = 'build.worker.ts:abort';
    const res = await t.as.supervisor
      .post(`/api/sites/${t.siteId}/floor-plans/${planId}/closures`)
      .set(csrf)
      .send({ kind: 'aisle', code: 'B', fromM: 5, toM: 6 });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('build_stopped');
    expect(res.body.error.message).toMatch(/^Building the walk graph and distances stopped with a fatal error/);
    await expectServing();
    const after = await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${planId}`);
    expect(after.body.closures).toEqual(before.body.closures);
    expect(after.body.closureVersion).toBe(before.body.closureVersion);
  }, 120_000);

  it('answers an import whose reading process runs out of memory with a file issue, and saves nothing', async () => {
    const skus = Number((await t.deps.db('skus').count({ n: '*' }))[0]!.n);
    process.env[CRASH_TEST_ENV] = 'read-worker.ts:oom';
    const csv = Buffer.from('sku,description,bin,unit_weight_kg,unit_volume_l\nNEW-1,Invented item,A-01-01-1,1,1\n');
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/skus/import`).set(csrf).attach('file', csv, 'skus.csv');
    expect(res.body.ok).toBe(false);
    expect(res.body.errors[0].message).toMatch(/^reading the file needed more than 512 MiB of memory and was stopped/);
    expect(Number((await t.deps.db('skus').count({ n: '*' }))[0]!.n)).toBe(skus);
    await expectServing();
  }, 120_000);

  it('stops a job whose typed arrays (outside the V8 heap) outgrow its memory allowance', async () => {
    process.env[CRASH_TEST_ENV] = 'read-worker.ts:offheap';
    const csv = Buffer.from('sku,description,bin,unit_weight_kg,unit_volume_l\nNEW-2,Invented item,A-01-01-1,1,1\n');
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/skus/import`).set(csrf).attach('file', csv, 'skus.csv');
    expect(res.body.ok).toBe(false);
    // Whichever stops it first: the process's memory watch (twice the 512 MiB heap cap plus 256 MiB,
    // server/workers/spawn.ts), or V8 refusing the next buffer under that heap cap.
    expect(res.body.errors[0].message).toMatch(/^reading the file needed more than (1280|512) MiB of memory and was stopped/);
    await expectServing();
  }, 120_000);
});
