import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { ActivationCheck, FloorPlanDetail, FloorPlanJob } from '../../../shared/floor-plans';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { DEMO_PLAN_PARAMS } from '../../../server/floor-plans/demo-seed';
import { engineParams } from '../../../server/floor-plans/floor-plans.service';
import { floorPlanToWorkbook } from '../../../server/floor-plans/import';
import { activePlanId } from '../../../server/floor-plans/plan-index';
import { csrf, type TestApp } from '../../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../../helpers/waves';
import { generatePlan, waitForJob } from './helpers';
import { binaryBody } from '../../helpers/http';

/**
 * The oracle for the counts is plain SQL over the same tables, written apart from the service's
 * TypeScript: SKUs whose bin has no row in the plan's bins, and open orders with such a line.
 */
/** First row's `n` of a raw query: SQLite answers the rows, PostgreSQL `{ rows }`. */
const countOf = (r: unknown): number => Number(((r as { rows?: { n: number }[] }).rows ?? (r as { n: number }[]))[0]!.n);

async function sqlSkusWithoutBin(t: TestApp, planId: number): Promise<number> {
  const r = await t.deps.db.raw('select count(*) as n from skus s where s.site_id = ? and s.bin not in (select code from floor_plan_bins where plan_id = ?)', [
    t.siteId,
    planId,
  ]);
  return countOf(r);
}
async function sqlOrdersUnplaceable(t: TestApp, planId: number): Promise<number> {
  const r = await t.deps.db.raw(
    `select count(distinct o.id) as n from orders o join order_lines l on l.order_id = o.id
     left join skus s on s.site_id = o.site_id and s.sku = l.sku
     where o.site_id = ? and o.status = 'open' and (s.id is null or s.bin not in (select code from floor_plan_bins where plan_id = ?))`,
    [t.siteId, planId],
  );
  return countOf(r);
}

describe('activation check and acknowledged activation (issue 10, item 8)', () => {
  let t: TestApp;
  let demoPlan: number;
  let renamedDraft: number;
  let waveId: number;
  const base = () => `/api/sites/${t.siteId}/floor-plans`;

  beforeAll(async () => {
    t = await makeDemoApp();
    demoPlan = (await activePlanId(t.deps.db, t.siteId))!;
    waveId = (await releaseDemoWave(t, { orders: 6 })).id;
    // The repro: the very same hall, but every bin code written differently (a new coding scheme).
    const plan = generateRectangularPlan(engineParams(DEMO_PLAN_PARAMS));
    plan.bins = plan.bins.map((b) => ({ ...b, code: `N${b.code}` }));
    const res = await t.as.supervisor.post(`${base()}/uploads`).set(csrf).attach('file', floorPlanToWorkbook(plan), 'renamed-bins.xlsx');
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const job = await waitForJob(t.as.supervisor, t.siteId, FloorPlanJob.parse(res.body).id);
    expect(job.status, job.message ?? '').toBe('done');
    renamedDraft = job.planId!;
  }, 120_000);
  afterAll(() => t.close());

  it('counts every SKU and open order a draft with other bin codes would orphan, and the wave still running', async () => {
    const res = await t.as.supervisor.get(`${base()}/${renamedDraft}/activation-check`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const check = ActivationCheck.parse(res.body);
    const openOrders = Number((await t.deps.db('orders').where({ site_id: t.siteId, status: 'open' }).count<{ n: number }[]>({ n: '*' }))[0]!.n);
    expect(check.skus).toBe(600);
    expect(check.skusWithoutBin).toBe(await sqlSkusWithoutBin(t, renamedDraft));
    expect(check.skusWithoutBin).toBe(600);
    expect(check.skusLosingBin).toBe(600);
    expect(check.openOrders).toBe(openOrders);
    expect(check.openOrdersUnplaceable).toBe(await sqlOrdersUnplaceable(t, renamedDraft));
    expect(check.openOrdersUnplaceable).toBe(openOrders);
    expect(check.openOrdersLosingPlacement).toBe(openOrders);
    expect(check.skusWithoutBinList).toHaveLength(50);
    expect(check.skusWithoutBinList[0]).toMatchObject({ onCurrentPlan: true });
    expect(check.openOrdersUnplaceableList[0]!.reason).toMatch(/^bin \S+ \(SKU BW-\d+\) is not on the plan$/);
    expect(check.currentPlan).toMatchObject({ id: demoPlan, version: 1, state: 'active' });
    expect(check.runningWaves).toEqual([expect.objectContaining({ id: waveId, status: 'released', planId: demoPlan, planVersion: 1 })]);
    expect(check.runningWaves[0]!.openTrips).toBeGreaterThan(0);
    expect(check.needsAcknowledgement).toBe(true);
    expect(check.skusWithoutBinDownload.xlsx).toBe(`${base()}/${renamedDraft}/activation-check/skus-without-bin?format=xlsx`);
  });

  it('lets an engineer read the check, but not a picker', async () => {
    expect((await t.as.engineer.get(`${base()}/${renamedDraft}/activation-check`)).status).toBe(200);
    expect((await t.as.picker.get(`${base()}/${renamedDraft}/activation-check`)).status).toBe(403);
    expect((await t.as.supervisor.get(`${base()}/999999/activation-check`)).status).toBe(404);
  });

  it('serves the whole list of SKUs without a bin as xlsx and as CSV', async () => {
    const x = await t.as.supervisor.get(`${base()}/${renamedDraft}/activation-check/skus-without-bin?format=xlsx`).buffer(true).parse(binaryBody);
    expect(x.status).toBe(200);
    expect(x.headers['content-disposition']).toMatch(/attachment; filename="skus-without-bin-v\d+\.xlsx"/);
    const wb = XLSX.read(x.body as Buffer);
    const rows = XLSX.utils.sheet_to_json<string[]>(wb.Sheets.skus_without_bin!, { header: 1 });
    expect(rows[0]).toEqual(['sku', 'description', 'bin', 'bin_on_current_plan']);
    expect(rows).toHaveLength(601);
    const csv = await t.as.supervisor.get(`${base()}/${renamedDraft}/activation-check/skus-without-bin?format=csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    const lines = csv.text
      .replace(/^\ufeff/, '')
      .trim()
      .split('\r\n');
    expect(lines).toHaveLength(601);
    const sku = (await t.deps
      .db('skus')
      .where({ site_id: t.siteId })
      .orderBy('sku')
      .first<{ sku: string; bin: string; description: string }>('sku', 'bin', 'description'))!;
    // RFC 4180: a field holding a comma is quoted.
    const description = sku.description.includes(',') ? `"${sku.description}"` : sku.description;
    expect(lines).toContain(`${sku.sku},${description},${sku.bin},yes`);
  });

  it('refuses to activate without the acknowledgement (409, nothing changes), and activates with it', async () => {
    for (const body of [undefined, {}, { acknowledge: false }]) {
      const req = t.as.supervisor.post(`${base()}/${renamedDraft}/activate`).set(csrf);
      const res = body === undefined ? await req : await req.send(body);
      expect(res.status).toBe(409);
      expect(res.body.error.code).toBe('activation_needs_acknowledgement');
      expect(res.body.error.message).toMatch(/600 SKUs without a bin and \d+ open orders that cannot be placed/);
      expect(ActivationCheck.parse(res.body.error.details).skusLosingBin).toBe(600);
      expect(await activePlanId(t.deps.db, t.siteId)).toBe(demoPlan);
    }
    expect((await t.as.supervisor.post(`${base()}/${renamedDraft}/activate`).set(csrf).send({ acknowledge: 'yes' })).status).toBe(400);
    const ok = await t.as.supervisor.post(`${base()}/${renamedDraft}/activate`).set(csrf).send({ acknowledge: true });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(FloorPlanDetail.parse(ok.body).state).toBe('active');
    expect(await activePlanId(t.deps.db, t.siteId)).toBe(renamedDraft);
    const audit = await t.deps.db('audit_log').where({ action: 'floor_plan.activated' }).orderBy('id', 'desc').first<{ detail: string }>('detail');
    expect(JSON.parse(audit!.detail)).toMatchObject({ planId: renamedDraft, acknowledged: true, skusLosingBin: 600 });
    // The running wave keeps the plan it was planned on.
    expect((await t.deps.db('waves').where({ id: waveId }).first<{ plan_id: number }>('plan_id'))!.plan_id).toBe(demoPlan);
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/waves/${waveId}`)).status).toBe(200);
  });

  it('rolls back to the retired plan without a re-upload, with no acknowledgement when it loses nothing', async () => {
    const before = ActivationCheck.parse((await t.as.supervisor.get(`${base()}/${demoPlan}/activation-check`)).body);
    expect(before).toMatchObject({
      plan: { id: demoPlan, state: 'retired' },
      currentPlan: { id: renamedDraft },
      skusWithoutBin: 0,
      skusLosingBin: 0,
      openOrdersUnplaceable: 0,
      needsAcknowledgement: false,
      runningWaves: [],
    });
    const res = await t.as.supervisor.post(`${base()}/${demoPlan}/activate`).set(csrf);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(FloorPlanDetail.parse(res.body)).toMatchObject({ state: 'active', retiredAt: null });
    expect(await activePlanId(t.deps.db, t.siteId)).toBe(demoPlan);
    const renamed = FloorPlanDetail.parse((await t.as.supervisor.get(`${base()}/${renamedDraft}`)).body);
    expect(renamed.state).toBe('retired');
    expect(await t.deps.db('audit_log').where({ action: 'floor_plan.reactivated', subject: 'v1' }).first()).toBeDefined();
    // Planning works on it again at once.
    expect((await releaseDemoWave(t, { orders: 3 })).trips).toBeGreaterThan(0);
  }, 60_000);

  it('needs no acknowledgement for a draft that keeps some bins, and counts exactly those it drops', async () => {
    // The demo hall cut to its first 6 of 12 aisles: SKUs slotted in aisles G–L lose their bin.
    const half = await generatePlan(t.as.supervisor, t.siteId, 'West half', { ...DEMO_PLAN_PARAMS, aisles: 6 });
    const check = ActivationCheck.parse((await t.as.supervisor.get(`${base()}/${half}/activation-check`)).body);
    const expectedSkus = await sqlSkusWithoutBin(t, half);
    expect(expectedSkus).toBeGreaterThan(0);
    expect(expectedSkus).toBeLessThan(600);
    expect(check.skusWithoutBin).toBe(expectedSkus);
    expect(check.skusLosingBin).toBe(expectedSkus);
    expect(check.openOrdersUnplaceable).toBe(await sqlOrdersUnplaceable(t, half));
    expect(check.needsAcknowledgement).toBe(true);
    // And a copy of the active hall loses nothing: activation goes through without a body.
    const same = await generatePlan(t.as.supervisor, t.siteId, 'Same hall', { ...DEMO_PLAN_PARAMS });
    const sameCheck = ActivationCheck.parse((await t.as.supervisor.get(`${base()}/${same}/activation-check`)).body);
    expect(sameCheck).toMatchObject({ skusWithoutBin: 0, openOrdersUnplaceable: 0, needsAcknowledgement: false });
    expect(sameCheck.runningWaves.map((w) => w.planId)).toEqual([demoPlan, demoPlan]);
    expect((await t.as.supervisor.post(`${base()}/${same}/activate`).set(csrf)).status).toBe(200);
  }, 60_000);
});
