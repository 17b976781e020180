/**
 * Slotting through the API on the demo site: upload a 20/80 order history, run each method, read the
 * figures (measured with the real batcher and router), apply chosen moves (audited, old bins kept),
 * and the refusals a supervisor meets (open waves on a moving SKU, a second apply, no history).
 */
import * as XLSX from 'xlsx';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../../../server/core/rng';
import { abcRank } from '../../../server/core/slotting/generate';
import type { SlottingRunDetail } from '../../../shared/slotting';
import { csrf, type TestApp } from '../../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../../helpers/waves';
import { binaryBody } from '../../helpers/http';

let t: TestApp;
let historyId: number;
let cartProfileId: number;
const url = () => `/api/sites/${t.siteId}/slotting`;

async function awaitRun(id: number): Promise<SlottingRunDetail> {
  for (let i = 0; i < 1200; i++) {
    const res = await t.as.engineer.get(`${url()}/runs/${id}`);
    expect(res.status).toBe(200);
    if (res.body.status !== 'queued' && res.body.status !== 'running') return res.body as SlottingRunDetail;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('slotting run did not finish in 120 s');
}

beforeAll(async () => {
  t = await makeDemoApp();
  cartProfileId = (await t.deps.db('cart_profiles').where({ site_id: t.siteId }).orderBy('id').first<{ id: number }>('id'))!.id;
  // Invented history: 6 days × 30 orders of 1–4 lines over the demo SKUs, popularity 20/80.
  const skus: string[] = await t.deps.db('skus').where({ site_id: t.siteId }).orderBy('sku').pluck('sku');
  const rng = createRng(21);
  const rows: unknown[][] = [['order', 'sku', 'qty', 'due', 'priority']];
  for (let d = 0; d < 6; d++) {
    for (let k = 0; k < 30; k++) {
      const seen = new Set<string>();
      const n = 1 + rng.int(4);
      for (let i = 0; i < n; i++) {
        const sku = skus[abcRank(rng.next(), skus.length)]!;
        if (seen.has(sku)) continue;
        seen.add(sku);
        rows.push([`HIST-${d}-${k}`, sku, 1 + rng.int(2), `2026-11-${String(20 + d).padStart(2, '0')}T16:00:00Z`, '']);
      }
    }
  }
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), 'orders');
  const bytes = XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
  const res = await t.as.engineer.post(`${url()}/histories`).set(csrf).attach('file', bytes, 'history.xlsx');
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  expect(res.body.days).toBe(6);
  expect(res.body.orders).toBe(180);
  historyId = res.body.historyId;
});
afterAll(() => t.close());

describe('slotting runs', () => {
  it('a popularity run with a move budget reports honest figures and at most that many moves', async () => {
    const res = await t.as.engineer
      .post(`${url()}/runs`)
      .set(csrf)
      .send({ name: 'Fast movers forward', method: 'popularity', history: { kind: 'upload', historyId }, maxMoves: 40, cartProfileId });
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const run = await awaitRun(res.body.id);
    expect(run.status, run.error ?? '').toBe('done');
    const r = run.results!;
    expect(r.moves.length).toBeGreaterThan(0);
    expect(r.moves.length).toBeLessThanOrEqual(40);
    expect(r.figures.learn.days).toBe(4);
    expect(r.figures.test.days).toBe(2);
    expect(r.figures.whole.metresAfter).toBeLessThan(r.figures.whole.metresBefore);
    for (const m of r.moves) expect(r.heat.after[m.toBin]).toBeGreaterThan(0);
    const xlsx = await t.as.engineer.get(`${url()}/runs/${run.id}/moves.xlsx`).buffer(true).parse(binaryBody);
    expect(xlsx.status).toBe(200);
    const rows = XLSX.utils.sheet_to_json<unknown[]>(XLSX.read(xlsx.body as Buffer, { type: 'buffer' }).Sheets.moves!, { header: 1 });
    expect(rows.length).toBe(r.moves.length + 1);
  }, 180_000);

  it('refuses an empty recorded history with a plain reason', async () => {
    const res = await t.as.engineer
      .post(`${url()}/runs`)
      .set(csrf)
      .send({ name: 'Nothing', method: 'search', history: { kind: 'recorded', from: '2020-01-01', to: '2020-01-31' }, cartProfileId });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('empty_history');
  }, 180_000);

  it('runs on a stored plan that is not active, and applies its moves only on the active plan', async () => {
    const activeId: number = (await t.deps.db('floor_plans').where({ site_id: t.siteId, state: 'active' }).first('id')).id;
    const res = await t.as.engineer
      .post(`${url()}/runs`)
      .set(csrf)
      .send({ name: 'On a chosen plan', method: 'popularity', history: { kind: 'upload', historyId }, maxMoves: 5, cartProfileId, planId: activeId });
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const run = await awaitRun(res.body.id);
    expect(run.status, run.error ?? '').toBe('done');
    expect(run.results!.planId).toBe(activeId);
    const unknown = await t.as.engineer
      .post(`${url()}/runs`)
      .set(csrf)
      .send({ name: 'No such plan', method: 'popularity', history: { kind: 'upload', historyId }, cartProfileId, planId: 999_999 });
    expect(unknown.status).toBe(404);
    await t.deps.db('floor_plans').where({ id: activeId }).update({ state: 'retired' });
    try {
      const refused = await t.as.supervisor.post(`${url()}/runs/${run.id}/apply`).set(csrf).send({});
      expect(refused.status).toBe(409);
      expect(refused.body.error.code).toBe('plan_changed');
    } finally {
      await t.deps.db('floor_plans').where({ id: activeId }).update({ state: 'active' });
    }
  }, 180_000);

  it('pickers cannot run slotting and engineers cannot apply it', async () => {
    expect((await t.as.picker.get(`${url()}/runs`)).status).toBe(403);
    expect((await t.as.engineer.post(`${url()}/runs/1/apply`).set(csrf).send({})).status).toBe(403);
  }, 180_000);

  it('applies the chosen moves in one audited step, keeps the old bins, and refuses a second apply', async () => {
    const res = await t.as.engineer
      .post(`${url()}/runs`)
      .set(csrf)
      .send({ name: 'Search', method: 'search', history: { kind: 'upload', historyId }, maxMoves: 20, cartProfileId });
    const run = await awaitRun(res.body.id);
    expect(run.status, run.error ?? '').toBe('done');
    // Moves into a free bin apply alone; pick those.
    const chosen = run.results!.moves.filter((m) => !run.results!.moves.some((o) => o.fromBin === m.toBin)).slice(0, 5);
    expect(chosen.length).toBeGreaterThan(0);
    const ok = await t.as.supervisor
      .post(`${url()}/runs/${run.id}/apply`)
      .set(csrf)
      .send({ skus: chosen.map((m) => m.sku) });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body.applied + ok.body.skipped.length).toBe(chosen.length);
    expect(ok.body.applied).toBeGreaterThan(0);
    for (const m of chosen.filter((c) => !ok.body.skipped.some((s: { sku: string }) => s.sku === c.sku))) {
      const row = await t.deps.db('skus').where({ site_id: t.siteId, sku: m.sku }).first('bin');
      expect(row.bin).toBe(m.toBin);
      const hist = await t.deps.db('sku_bin_history').where({ site_id: t.siteId, sku: m.sku }).first();
      expect(hist.from_bin).toBe(m.fromBin);
    }
    expect(await t.deps.db('audit_log').where({ action: 'slotting.apply' }).count({ n: '*' }).first()).toEqual({ n: 1 });
    const again = await t.as.supervisor.post(`${url()}/runs/${run.id}/apply`).set(csrf).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('already_applied');
  }, 180_000);

  it('refuses to move SKUs that open waves still have to pick, naming the wave', async () => {
    const wave = await releaseDemoWave(t, { orders: 40 });
    const res = await t.as.engineer
      .post(`${url()}/runs`)
      .set(csrf)
      .send({ name: 'All', method: 'popularity', history: { kind: 'upload', historyId }, cartProfileId });
    const run = await awaitRun(res.body.id);
    expect(run.status).toBe('done');
    const open: string[] = await t.deps
      .db('pick_lines')
      .join('trips', 'trips.id', 'pick_lines.trip_id')
      .where({ 'trips.wave_id': wave.id, 'pick_lines.status': 'open' })
      .pluck('pick_lines.sku');
    const clash = run.results!.moves.find((m) => open.includes(m.sku));
    expect(clash, 'a full re-slotting moves some SKU of a 40-order wave').toBeDefined();
    const refused = await t.as.supervisor
      .post(`${url()}/runs/${run.id}/apply`)
      .set(csrf)
      .send({ skus: [clash!.sku] });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('open_waves');
    expect(refused.body.error.message).toContain(wave.name);
  });
});
