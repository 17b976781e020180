import { expect } from 'vitest';
import type request from 'supertest';
import { FloorPlanJob, type GeneratePlanParams } from '../../../shared/floor-plans';
import { csrf } from '../../helpers/app';

type Agent = ReturnType<typeof request.agent>;

/** Polls a build job until it ends (the client polls the same way). */
export async function waitForJob(agent: Agent, siteId: number, jobId: string, timeoutMs = 60_000): Promise<FloorPlanJob> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const res = await agent.get(`/api/sites/${siteId}/floor-plans/jobs/${jobId}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const job = FloorPlanJob.parse(res.body);
    if (job.finishedAt) return job;
    if (Date.now() > until) throw new Error(`job ${jobId} still ${job.phase} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Generates a plan through the API and returns its id once saved. */
export async function generatePlan(
  agent: Agent,
  siteId: number,
  name: string,
  params: Partial<GeneratePlanParams> & Pick<GeneratePlanParams, 'aisles' | 'baysPerAisle'>,
): Promise<number> {
  const body = {
    name,
    params: { aisleLengthM: 20, aisleSpacingM: 4, levels: 1, crossAisles: { front: true, back: true, middle: 0 }, ...params },
  };
  const res = await agent.post(`/api/sites/${siteId}/floor-plans/generate`).set(csrf).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  const job = await waitForJob(agent, siteId, (res.body as FloorPlanJob).id);
  expect(job.status, job.message ?? '').toBe('done');
  return job.planId!;
}

/** Rows in every floor-plan table, to show that a refused upload left the database unchanged. */
export async function floorPlanRowCounts(db: import('knex').Knex): Promise<Record<string, number>> {
  const tables = [
    'floor_plans',
    'floor_plan_aisles',
    'floor_plan_cross_aisles',
    'floor_plan_bins',
    'floor_plan_depots',
    'floor_plan_closures',
    'floor_plan_graphs',
    'floor_plan_arrays',
  ];
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = Number((await db(t).count<{ n: number }[]>({ n: '*' }))[0]!.n);
  return out;
}
