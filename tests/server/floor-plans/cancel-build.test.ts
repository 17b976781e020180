/**
 * Cancelling a plan build: the job's process is stopped through the job's AbortSignal and nothing of
 * the plan is saved, even after the job runner has settled (without the signal the build ran on in its
 * process and saved a draft behind a job that said "cancelled").
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FloorPlanJob } from '../../../shared/floor-plans';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { floorPlanToWorkbook } from '../../../server/floor-plans/import';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { floorPlanRowCounts, waitForJob } from './helpers';

let t: TestApp;
const base = () => `/api/sites/${t.siteId}/floor-plans`;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

/** A plan big enough that its walk graph and distances take a while to build. */
const bigPlan = {
  name: 'Big layout',
  params: { aisles: 80, aisleLengthM: 120, aisleSpacingM: 3, baysPerAisle: 200, levels: 1, crossAisles: { front: true, back: true, middle: 3 } },
};

/** Polls until the build runs in its own process (walk graph or distances), and answers that state. */
async function whenBuilding(jobId: string): Promise<FloorPlanJob> {
  for (;;) {
    const job = FloorPlanJob.parse((await t.as.supervisor.get(`${base()}/jobs/${jobId}`)).body);
    if (job.finishedAt) throw new Error(`the build ended (${job.status}) before it could be cancelled`);
    if (job.phase === 'building_graph' || job.phase === 'building_distances') return job;
    await new Promise((r) => setTimeout(r, 20));
  }
}

describe('cancelling a plan build', () => {
  it('stops a running build: the job answers cancelled and no plan is saved', async () => {
    const before = await floorPlanRowCounts(t.deps.db);
    const started = await t.as.supervisor.post(`${base()}/generate`).set(csrf).send(bigPlan);
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const id = FloorPlanJob.parse(started.body).id;
    await whenBuilding(id);

    const res = await t.as.supervisor.post(`${base()}/jobs/${id}/cancel`).set(csrf).send({});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const cancelled = FloorPlanJob.parse(res.body);
    expect(cancelled.status).toBe('cancelled');
    expect(cancelled.finishedAt).not.toBeNull();
    expect(cancelled.message).toMatch(/cancelled; nothing was saved/);

    // Whatever the build was doing has finished now; it saved nothing.
    await t.deps.jobs.settled();
    expect((await waitForJob(t.as.supervisor, t.siteId, id)).status).toBe('cancelled');
    expect(await floorPlanRowCounts(t.deps.db)).toEqual(before);
    expect(await t.deps.db('audit_log').where({ action: 'floor_plan.draft_saved' })).toHaveLength(0);
  });

  it('refuses to cancel a build that has ended (409) and an unknown job (404)', async () => {
    const small = {
      name: 'Small layout',
      params: { aisles: 2, aisleLengthM: 10, aisleSpacingM: 3, baysPerAisle: 3, levels: 1, crossAisles: { front: true, back: true, middle: 0 } },
    };
    const started = await t.as.supervisor.post(`${base()}/generate`).set(csrf).send(small);
    const done = await waitForJob(t.as.supervisor, t.siteId, FloorPlanJob.parse(started.body).id);
    expect(done.status).toBe('done');
    const again = await t.as.supervisor.post(`${base()}/jobs/${done.id}/cancel`).set(csrf).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('not_running');
    const unknown = await t.as.supervisor.post(`${base()}/jobs/00000000-0000-4000-8000-000000000000/cancel`).set(csrf).send({});
    expect(unknown.status).toBe(404);
  });

  it('lets only those who may upload cancel an upload', async () => {
    const plan = generateRectangularPlan({ aisles: 2, aisleLengthM: 20, aisleSpacingM: 4, baysPerAisle: 2, levels: 1 });
    const started = await t.as.supervisor.post(`${base()}/uploads`).set(csrf).attach('file', floorPlanToWorkbook(plan), 'small.xlsx');
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const id = FloorPlanJob.parse(started.body).id;
    const res = await t.as.engineer.post(`${base()}/jobs/${id}/cancel`).set(csrf).send({});
    expect(res.status).toBe(403);
    await waitForJob(t.as.supervisor, t.siteId, id);
  });
});
