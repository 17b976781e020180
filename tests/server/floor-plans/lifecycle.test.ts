import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FloorPlanDetail, FloorPlanSummary } from '../../../shared/floor-plans';
import { activePlanId, loadPlanIndex } from '../../../server/floor-plans/plan-index';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { generatePlan, waitForJob } from './helpers';

describe('floor plans: generate → draft → activate → retire', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  it('saves a generated plan as draft version 1 with its stats and who made it', async () => {
    const id = await generatePlan(t.as.engineer, t.siteId, 'Study hall', { aisles: 3, baysPerAisle: 4, levels: 2 });
    const res = await t.as.engineer.get(`/api/sites/${t.siteId}/floor-plans/${id}`);
    expect(res.status).toBe(200);
    const plan = FloorPlanDetail.parse(res.body);
    expect(plan).toMatchObject({ version: 1, state: 'draft', source: 'generated', name: 'Study hall', readOnly: false });
    expect(plan.uploadedBy?.name).toBe('Eli Engineer');
    // 3 aisles × 4 bays × 2 sides × 2 levels; one access point per bay (both sides share it).
    expect(plan.stats).toEqual({ bins: 48, aisles: 3, crossAisles: 2, accessPoints: 12, depots: 1, totalAisleLengthM: 60 });
    expect(plan.storedBytes).toBeGreaterThan(0);
    expect(plan.unreachableBins).toEqual([]);
  });

  it('numbers versions per site and lists the newest first', async () => {
    await generatePlan(t.as.supervisor, t.siteId, 'Second', { aisles: 2, baysPerAisle: 2 });
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans`);
    const list = FloorPlanSummary.array().parse(res.body);
    expect(list.map((p) => [p.version, p.name])).toEqual([
      [2, 'Second'],
      [1, 'Study hall'],
    ]);
  });

  it('activating retires the previous active plan, and only one plan is ever active', async () => {
    const list = FloorPlanSummary.array().parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans`)).body);
    const [v2, v1] = [list[0]!.id, list[1]!.id];
    const a1 = await t.as.supervisor.post(`/api/sites/${t.siteId}/floor-plans/${v1}/activate`).set(csrf);
    expect(a1.status).toBe(200);
    expect(await activePlanId(t.deps.db, t.siteId)).toBe(v1);
    const a2 = await t.as.admin.post(`/api/sites/${t.siteId}/floor-plans/${v2}/activate`).set(csrf);
    expect(a2.status).toBe(200);
    const after = FloorPlanSummary.array().parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans`)).body);
    expect(after.map((p) => [p.version, p.state, p.readOnly])).toEqual([
      [2, 'active', false],
      [1, 'retired', true],
    ]);
    expect(after[1]!.retiredAt).not.toBeNull();
    expect(await activePlanId(t.deps.db, t.siteId)).toBe(v2);
  });

  it('keeps retired plans read-only: no closure, rename or delete (activating one again is a rollback, see activation-check.test.ts)', async () => {
    const list = FloorPlanSummary.array().parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans`)).body);
    const retired = list.find((p) => p.state === 'retired')!;
    const base = `/api/sites/${t.siteId}/floor-plans/${retired.id}`;
    expect((await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'A', fromM: 5, toM: 6 })).status).toBe(409);
    expect((await t.as.supervisor.patch(base).set(csrf).send({ name: 'x' })).status).toBe(409);
    expect((await t.as.supervisor.delete(base).set(csrf)).status).toBe(409);
  });

  it('lets a picker read the active plan for the trip map, but not the list or uploads', async () => {
    const res = await t.as.picker.get(`/api/sites/${t.siteId}/floor-plans/active`);
    expect(res.status).toBe(200);
    expect(res.body.plan.state).toBe('active');
    expect(res.body.geometry.bins).toHaveLength(res.body.plan.stats.bins);
    expect((await t.as.picker.get(`/api/sites/${t.siteId}/floor-plans`)).status).toBe(403);
    const up = await t.as.picker.post(`/api/sites/${t.siteId}/floor-plans/uploads`).set(csrf).attach('file', Buffer.from('aisle,x_m\n'), 'plan.csv');
    expect(up.status).toBe(403);
    expect(up.body.error.code).toBe('forbidden');
    const gen = await t.as.picker.post(`/api/sites/${t.siteId}/floor-plans/generate`).set(csrf).send({});
    expect(gen.status).toBe(403);
  });

  it('lets an engineer generate but not activate', async () => {
    const id = await generatePlan(t.as.engineer, t.siteId, 'What-if', { aisles: 2, baysPerAisle: 2 });
    const res = await t.as.engineer.post(`/api/sites/${t.siteId}/floor-plans/${id}/activate`).set(csrf);
    expect(res.status).toBe(403);
  });

  it('deletes a draft, and nothing else', async () => {
    const id = await generatePlan(t.as.supervisor, t.siteId, 'Scratch', { aisles: 2, baysPerAisle: 2 });
    expect((await t.as.supervisor.delete(`/api/sites/${t.siteId}/floor-plans/${id}`).set(csrf)).status).toBe(200);
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${id}`)).status).toBe(404);
    expect(Number((await t.deps.db('floor_plan_bins').where({ plan_id: id }).count<{ n: number }[]>({ n: '*' }))[0]!.n)).toBe(0);
    const active = (await activePlanId(t.deps.db, t.siteId))!;
    expect((await t.as.supervisor.delete(`/api/sites/${t.siteId}/floor-plans/${active}`).set(csrf)).body.error.code).toBe('not_a_draft');
  });

  it('refuses generator parameters with the field named', async () => {
    const res = await t.as.engineer
      .post(`/api/sites/${t.siteId}/floor-plans/generate`)
      .set(csrf)
      .send({ name: 'Bad', params: { aisles: 0, aisleLengthM: -1, aisleSpacingM: 3, baysPerAisle: 2, levels: 1, crossAisles: {} } });
    expect(res.status).toBe(400);
    const fields = (res.body.error.details as { field: string }[]).map((d) => d.field);
    expect(fields).toEqual(expect.arrayContaining(['params.aisles', 'params.aisleLengthM']));
  });

  it('loads a stored plan back from its BLOBs with the same distances it was built with', async () => {
    const id = (await activePlanId(t.deps.db, t.siteId))!;
    const loaded = await loadPlanIndex(t.deps.db, id);
    expect(loaded.geometry.bins).toHaveLength(loaded.graph.binNode.length);
    expect(loaded.binNode('A-01-01-1')).toBeGreaterThanOrEqual(0);
    expect(loaded.binNode('ZZ-99-99-9')).toBeUndefined();
    expect(await loadPlanIndex(t.deps.db, id)).toBe(loaded);
  });
});

describe('floor plans of another site', () => {
  let t: TestApp;
  let otherSite: number;
  let otherPlan: number;
  beforeAll(async () => {
    t = await makeTestApp();
    const site = await t.as.admin.post('/api/sites').set(csrf).send({ code: 'NTH', name: 'North annex' });
    otherSite = site.body.id as number;
    otherPlan = await generatePlan(t.as.admin, otherSite, 'North', { aisles: 2, baysPerAisle: 2 });
  });
  afterAll(() => t.close());

  it('are 403 through the other site, and 404 through your own', async () => {
    expect((await t.as.supervisor.get(`/api/sites/${otherSite}/floor-plans`)).status).toBe(403);
    expect((await t.as.supervisor.get(`/api/sites/${otherSite}/floor-plans/${otherPlan}`)).status).toBe(403);
    const own = await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${otherPlan}`);
    expect(own.status).toBe(404);
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/floor-plans/${otherPlan}/activate`).set(csrf)).status).toBe(404);
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${otherPlan}/geometry`)).status).toBe(404);
  });

  it('keep their own version numbers', async () => {
    const mine = await generatePlan(t.as.supervisor, t.siteId, 'Mine', { aisles: 2, baysPerAisle: 2 });
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${mine}`);
    expect(res.body.version).toBe(1);
  });

  it("hide another site's jobs", async () => {
    const res = await t.as.admin
      .post(`/api/sites/${otherSite}/floor-plans/generate`)
      .set(csrf)
      .send({ name: 'N2', params: { aisles: 2, aisleLengthM: 20, aisleSpacingM: 4, baysPerAisle: 2, levels: 1, crossAisles: {} } });
    expect(res.status).toBe(202);
    expect((await t.as.admin.get(`/api/sites/${t.siteId}/floor-plans/jobs/${res.body.id}`)).status).toBe(404);
    expect((await t.as.admin.get(`/api/sites/${otherSite}/floor-plans/jobs/${res.body.id}`)).status).toBe(200);
  });
});

describe('a generated plan the engine refuses', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  it('ends the job as failed with the reason, saving nothing', async () => {
    // 4 m aisles cannot hold racks between front, 3 middle and back cross aisles 3 m wide.
    const res = await t.as.engineer
      .post(`/api/sites/${t.siteId}/floor-plans/generate`)
      .set(csrf)
      .send({ name: 'Cramped', params: { aisles: 2, aisleLengthM: 4, aisleSpacingM: 3, baysPerAisle: 8, levels: 1, crossAisles: { middle: 3 } } });
    expect(res.status).toBe(202);
    const job = await waitForJob(t.as.engineer, t.siteId, res.body.id);
    expect(job.status).toBe('failed');
    expect(job.message).toMatch(/no room for racks/);
    expect(await t.deps.db('floor_plans').count<{ n: number }[]>({ n: '*' })).toEqual([{ n: 0 }]);
  });
});

describe('a save interrupted by a stopped server', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  it('leaves an unlisted plan that the next save removes with its rows', async () => {
    const [{ id: stale }] = await t.deps
      .db('floor_plans')
      .insert({ site_id: t.siteId, name: 'half saved', state: 'building', source: 'upload', created_at: new Date().toISOString() }, 'id');
    await t.deps.db('floor_plan_aisles').insert({ plan_id: stale, idx: 0, code: 'A', x_m: 0, y_start_m: 0, y_end_m: 10 });
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans`)).body).toEqual([]);
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${stale}`)).status).toBe(404);
    const id = await generatePlan(t.as.supervisor, t.siteId, 'Next', { aisles: 2, baysPerAisle: 2 });
    expect(await t.deps.db('floor_plans').pluck('id')).toEqual([id]);
    expect(await t.deps.db('floor_plan_aisles').where({ plan_id: stale }).count<{ n: number }[]>({ n: '*' })).toEqual([{ n: 0 }]);
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/floor-plans/${id}`)).body.version).toBe(1);
  });
});
