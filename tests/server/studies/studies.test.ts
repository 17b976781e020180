import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { planWave } from '../../../server/core/batch/plan-wave';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { pairDistance, tripMatrix } from '../../../server/core/plan/distances';
import { sShape } from '../../../server/core/policy/policies';
import { isNotApplicable } from '../../../server/core/policy/types';
import { solveTour } from '../../../server/core/tour/index';
import { engineParams } from '../../../server/floor-plans/floor-plans.service';
import { generateStudyOrders } from '../../../server/studies/generate-orders';
import { buildPlan } from '../../../server/studies/study-engine';
import type { GeneratePlanParams } from '../../../shared/floor-plans';
import type { StudyDetail, StudyInputsBody, StudyResults, StudySummary } from '../../../shared/studies';
import { csrf, type TestApp } from '../../helpers/app';
import { steppingClock } from '../../helpers/clock';
import { makeDemoApp, releaseDemoWave } from '../../helpers/waves';

/** One block (front and back cross aisles only): every routing policy applies. */
const SINGLE_BLOCK: GeneratePlanParams = {
  aisles: 8,
  aisleLengthM: 30,
  aisleSpacingM: 3.2,
  baysPerAisle: 15,
  levels: 2,
  bothSides: true,
  crossAisles: { front: true, back: true, middle: 0 },
  crossAisleWidthM: 3,
  depot: 'front_left',
};

const generated = (name: string, seed: number, extra: Partial<StudyInputsBody> = {}): StudyInputsBody => ({
  name,
  seed,
  work: {
    kind: 'generated',
    plan: { source: 'generated', params: SINGLE_BLOCK },
    orders: { waves: 2, ordersPerWave: 24, linesMin: 2, linesMax: 4, skus: 150, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 2 },
    batching: 'savings',
    wavesPerDay: 10,
  },
  routing: ['best+local', 'best+deep', 'nearest-neighbor+none', 'exact', 's-shape', 'return', 'midpoint', 'largest-gap', 'combined', 'ratliff-rosenthal'],
  batching: ['single', 'fcfs', 'seed', 'savings'],
  whatIfs: [{ label: 'Middle cross aisle', changes: [{ kind: 'add_cross_aisle', yM: 15 }] }],
  ...extra,
});

let t: TestApp;
const base = () => `/api/sites/${t.siteId}/studies`;

async function waitDone(id: number): Promise<StudyDetail & { results: StudyResults }> {
  for (let i = 0; i < 1200; i++) {
    const res = await t.as.engineer.get(`${base()}/${id}`);
    expect(res.status).toBe(200);
    const s = res.body as StudyDetail;
    if (s.status === 'done') return s as StudyDetail & { results: StudyResults };
    if (s.status === 'failed' || s.status === 'cancelled') throw new Error(`study ${id} ${s.status}: ${s.error}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('study did not finish in 120 s');
}

/** A study's workbook download, its body as bytes. */
const workbook = (id: number) =>
  t.as.engineer
    .get(`${base()}/${id}/export.xlsx`)
    .buffer(true)
    .parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });

async function start(body: StudyInputsBody): Promise<StudySummary> {
  const res = await t.as.engineer.post(base()).set(csrf).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return res.body as StudySummary;
}

/** Figures only: compute times are wall-clock and differ between runs by design. */
function figures(r: StudyResults): unknown {
  return r.variants.map((v) => ({
    routing: v.routing.map(({ ms: _ms, ...rest }) => rest),
    batching: v.batching.map(({ ms: _ms, ...rest }) => rest),
    trips: v.trips,
  }));
}

let first: StudyDetail & { results: StudyResults };

beforeAll(async () => {
  t = await makeDemoApp();
  first = await waitDone((await start(generated('Single block, 2–4 lines', 42))).id);
}, 180_000);
afterAll(() => t.close());

describe('studies', () => {
  it('lets engineers and supervisors in and keeps pickers and admins out', async () => {
    expect((await t.as.engineer.get(base())).status).toBe(200);
    expect((await t.as.supervisor.get(base())).status).toBe(200);
    expect((await t.as.picker.get(base())).status).toBe(403);
    expect((await t.as.picker.post(base()).set(csrf).send(generated('x', 1))).status).toBe(403);
    expect((await t.as.picker.get(`${base()}/${first.id}/export.xlsx`)).status).toBe(403);
    expect((await t.as.admin.get(base())).status).toBe(403);
  });

  it('gives identical figures when rerun with the same seed, and other figures with another seed', async () => {
    const res = await t.as.engineer.post(`${base()}/${first.id}/rerun`).set(csrf).send({});
    expect(res.status).toBe(202);
    expect(res.body.rerunOf).toBe(first.id);
    const again = await waitDone(res.body.id);
    expect(again.inputs.seed).toBe(42);
    expect(figures(again.results)).toEqual(figures(first.results));
    const other = await waitDone((await start(generated('Other seed', 43))).id);
    expect(figures(other.results)).not.toEqual(figures(first.results));
  }, 240_000);

  it("equals the engine's direct results for the same trips", () => {
    const plan = buildPlan({ geometry: generateRectangularPlan(engineParams(SINGLE_BLOCK)), closures: [], depotIdx: 0 });
    const v = first.results.variants[0]!;
    expect(v.depotNode).toBe(plan.depotNode);
    for (const trip of v.trips) {
      const m = tripMatrix(plan.index, [plan.depotNode, ...trip.nodes]);
      expect(trip.metres['best+local']).toBeCloseTo(
        solveTour(m, { method: 'best', improve: 'local', timeLimitMs: 10_000, clock: steppingClock(0.001) }).length,
        6,
      );
      expect(trip.metres['nearest-neighbor+none']).toBeCloseTo(solveTour(m, { method: 'nearest-neighbor' }).length, 6);
      if (trip.nodes.length <= 16)
        expect(trip.metres.exact).toBeCloseTo(solveTour(m, { method: 'exact', timeLimitMs: 10_000, clock: steppingClock(0.001) }).length, 6);
      const layout = plan.layout;
      if (isNotApplicable(layout)) throw new Error(layout.reason);
      const s = sShape(
        layout,
        layout.depots[0]!.x,
        trip.nodes.map((n) => plan.stopOf(n)!),
      );
      if (isNotApplicable(s)) throw new Error(s.reason);
      // The wave planner's convention: the depot's link to the front cross aisle is walked out and back.
      expect(trip.metres['s-shape']).toBeCloseTo(s.length + 2 * layout.depots[0]!.offset, 6);
    }
    // The whole savings row against the engine's wave planner on the same generated orders.
    const waves = generateStudyOrders(
      plan.input.geometry.bins,
      { waves: 2, ordersPerWave: 24, linesMin: 2, linesMax: 4, skus: 150, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 2 },
      42,
    );
    let direct = 0;
    for (const orders of waves) {
      const r = planWave({
        orders: orders.map((o) => ({ ref: o.ref, lines: o.lines.map((l) => ({ ...l, node: plan.binNode(l.bin)! })) })),
        cart: first.results.cart,
        batching: 'savings',
        depotNode: plan.depotNode,
        distance: (a, b) => pairDistance(plan.index, a, b),
        timeLimitMs: 60_000,
        clock: steppingClock(0.001),
      });
      direct += r.totals.metres;
    }
    expect(v.batching.find((b) => b.method === 'savings')!.metres).toBeCloseTo(direct, 6);
    // Ratliff & Rosenthal is optimal on one block and Held–Karp is optimal: they agree where both apply.
    for (const trip of v.trips) if (trip.nodes.length <= 16) expect(trip.metres['ratliff-rosenthal']).toBeCloseTo(trip.metres.exact!, 6);
  });

  it('ranks S-shape longer than largest gap and the default method on one block (Petersen 1997; Roodbergen & de Koster 2001)', () => {
    const routing = first.results.variants[0]!.routing;
    const m = (k: string) => routing.find((r) => r.key === k)!.metres!;
    expect(m('s-shape')).toBeGreaterThan(m('largest-gap'));
    expect(m('s-shape')).toBeGreaterThan(m('best+local'));
    // No route is shorter than the optimum, and the bound is below every route.
    expect(m('best+local')).toBeGreaterThanOrEqual(m('ratliff-rosenthal') - 1e-6);
    for (const r of routing) if (r.metres !== null) expect(r.aboveBoundPct!).toBeGreaterThanOrEqual(-1e-9);
  });

  it('reduces total metres by batching orders of 2–4 lines against one order per trip (de Koster, van der Poort & Wolters 1999)', () => {
    const b = first.results.variants[0]!.batching;
    const single = b.find((x) => x.method === 'single')!;
    for (const method of ['fcfs', 'seed', 'savings'] as const) expect(b.find((x) => x.method === method)!.metres).toBeLessThan(single.metres);
    expect(single.trips).toBe(48);
  });

  it('reports the what-if per method: a middle cross aisle shortens S-shape routes here', () => {
    const row = first.results.whatIf.find((w) => w.method === 's-shape')!;
    expect(row.deltaMetres).toBeLessThan(0);
    expect(row.deltaMetres).toBeCloseTo(row.metres! - row.baseMetres!, 6);
    const whatIf = first.results.variants[1]!;
    expect(whatIf.layout.blocks).toBe(2);
    expect(whatIf.routing.find((r) => r.key === 'largest-gap')!.applicable).toBe(false);
  });

  it('exports a workbook whose sheets hold the same figures as the page', async () => {
    const res = await workbook(first.id);
    expect(res.status).toBe(200);
    const wb = XLSX.read(res.body as Buffer, { type: 'buffer' });
    expect(wb.SheetNames[0]).toBe('inputs');
    expect(wb.SheetNames).toEqual(expect.arrayContaining(['routing', 'batching', 'trips', 'routing what-if 1', 'what-if']));
    const inputs = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets.inputs!, { header: 1 });
    expect(inputs.find((r) => r[0] === 'seed')![1]).toBe(42);
    const rows = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets.routing!, { header: 1 }).slice(2);
    const page = first.results.variants[0]!.routing;
    expect(rows.length).toBe(page.length);
    for (const r of page) {
      const row = rows.find((x) => x[0] === r.key)!;
      expect(row[2]).toBe(r.metres === null ? '' : Math.round(r.metres * 10) / 10);
      expect(row[8]).toBe(r.hoursPerDay === null ? '' : Math.round(r.hoursPerDay * 100) / 100);
    }
    const batching = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets.batching!, { header: 1 }).slice(2);
    for (const b of first.results.variants[0]!.batching) expect(batching.find((x) => x[0] === b.method)![5]).toBe(Math.round(b.metres * 10) / 10);
  });

  it("runs 3 replications of a generated scenario: the first seed is the study, each method's mean and 95 % interval, and a replications sheet", async () => {
    const body = generated('Replicated', 42, { replications: 3, routing: ['best+local', 's-shape'], batching: ['savings'], whatIfs: [] });
    const s = await waitDone((await start(body)).id);
    const rep = s.results.replications!;
    expect(rep.seeds).toEqual([42, 43, 44]);
    const sShape = rep.variants[0]!.routing.find((r) => r.key === 's-shape')!;
    // The first replication is the study with seed 42 (the same figures as the first study of this file).
    expect(sShape.metres[0]).toBeCloseTo(first.results.variants[0]!.routing.find((r) => r.key === 's-shape')!.metres!, 6);
    expect(s.results.variants[0]!.routing.find((r) => r.key === 's-shape')!.metres).toBe(sShape.metres[0]);
    const mean = sShape.metres.reduce<number>((a, m) => a + m!, 0) / 3;
    expect(sShape.metresCi!.mean).toBeCloseTo(mean, 9);
    expect(sShape.metresCi!.high! - sShape.metresCi!.low!).toBeGreaterThan(0);
    const res = await workbook(s.id);
    const wb = XLSX.read(res.body as Buffer, { type: 'buffer' });
    const rows = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets.replications!, { header: 1 });
    const mine = rows.filter((r) => r[1] === 'routing' && r[2] === 's-shape');
    expect(mine.map((r) => r[4])).toEqual([
      'seed 42',
      'seed 43',
      'seed 44',
      'mean of 3',
      'standard deviation',
      't (0.975, 2 degrees of freedom)',
      '95 % interval low',
      '95 % interval high',
    ]);
    expect(mine.slice(0, 3).map((r) => r[5])).toEqual(sShape.metres.map((m) => Math.round(m! * 10) / 10));
    expect(mine[3]![5]).toBe(Math.round(mean * 10) / 10);
    // t(0.975, 2) = 4.303 (t table).
    expect(mine[5]![5]).toBe(4.3);
  }, 240_000);

  it('refuses replications on recorded waves with a plain message naming the field', async () => {
    const res = await t.as.engineer
      .post(base())
      .set(csrf)
      .send({
        name: 'Recorded replicated',
        seed: 1,
        replications: 5,
        work: { kind: 'recorded', waveIds: [1] },
        routing: ['best+local'],
        batching: ['savings'],
      });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([expect.objectContaining({ field: 'replications', message: expect.stringMatching(/nothing to replicate/) })]);
  });

  it('draws one trip by two methods for the side-by-side maps', async () => {
    const q = (method: string) => t.as.engineer.get(`${base()}/${first.id}/route`).query({ variant: 'base', trip: 1, method });
    const [a, b] = await Promise.all([q('s-shape'), q('best+local')]);
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    const trip = first.results.variants[0]!.trips[0]!;
    expect(a.body.metres).toBeCloseTo(trip.metres['s-shape']!, 6);
    expect(b.body.stops).toHaveLength(trip.nodes.length);
    // The drawn polyline is as long as the figure in the table.
    const len = (pts: { x: number; y: number }[]) => pts.slice(1).reduce((s, p, i) => s + Math.hypot(p.x - pts[i]!.x, p.y - pts[i]!.y), 0);
    expect(len(a.body.points)).toBeCloseTo(trip.metres['s-shape']!, 3);
    expect(len(b.body.points)).toBeCloseTo(trip.metres['best+local']!, 3);
    const plan = await t.as.engineer.get(`${base()}/${first.id}/plans/what-if-1`);
    expect(plan.status).toBe(200);
    expect(plan.body.geometry.crossAisles).toHaveLength(3);
  });

  it('cancels a running study by stopping its worker', async () => {
    const big = generated('Big', 5, {
      work: {
        ...(generated('x', 5).work as object),
        orders: { waves: 6, ordersPerWave: 200, linesMin: 2, linesMax: 8, skus: 200, skewSkuPct: 20, skewLinesPct: 80 },
      } as StudyInputsBody['work'],
    });
    const s = await start(big);
    const res = await t.as.engineer.post(`${base()}/${s.id}/cancel`).set(csrf).send({});
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('cancelled');
    const after = await t.as.engineer.get(`${base()}/${s.id}`);
    expect(after.body.status).toBe('cancelled');
    expect((await t.as.engineer.post(`${base()}/${s.id}/cancel`).set(csrf).send({})).status).toBe(409);
  });

  it('compares a recorded wave: planned metres as released, walked metres as confirmed', async () => {
    const wave = await releaseDemoWave(t, { orders: 12, batching: 'savings' });
    const s = await start({
      name: 'Recorded',
      seed: 1,
      work: { kind: 'recorded', waveIds: [wave.id] },
      routing: ['best+local', 's-shape'],
      batching: ['single', 'savings'],
    });
    let done = await waitDone(s.id);
    const rec = done.results.recorded![0]!;
    expect(rec.waveId).toBe(wave.id);
    expect(rec.plannedMetres).toBeCloseTo(wave.plannedMetres, 1);
    expect(rec.walkedMetres).toBeNull();
    // Routed again by the default method on the same plan, the released trips measure what the wave planner planned.
    expect(rec.defaultMetres!).toBeCloseTo(wave.plannedMetres, 0);
    // A picker confirms the first trip's stops in reverse order: the walk is the reversed circuit, the same length.
    const trip = (await t.deps.db('trips').where({ wave_id: wave.id }).orderBy('n').first<{ id: number; planned_metres: number }>())!;
    const stops: { id: number }[] = await t.deps.db('stops').where({ trip_id: trip.id }).orderBy('n', 'desc');
    for (const [i, st] of stops.entries())
      await t.deps
        .db('stops')
        .where({ id: st.id })
        .update({ status: 'done', done_seq: i + 1 });
    done = await waitDone(
      (await start({ name: 'Recorded again', seed: 1, work: { kind: 'recorded', waveIds: [wave.id] }, routing: ['best+local'], batching: ['savings'] })).id,
    );
    const again = done.results.recorded![0]!;
    expect(again.confirmedTrips).toBe(1);
    expect(again.walkedMetres!).toBeCloseTo(trip.planned_metres, 1);
  }, 120_000);

  it('gives no what-if difference when a closed stretch leaves orders unreachable, and says why', async () => {
    const closed = await waitDone(
      (
        await start(
          generated('Closed stretch', 7, {
            work: {
              ...(generated('x', 7).work as object),
              orders: { waves: 1, ordersPerWave: 24, linesMin: 2, linesMax: 4, skus: 150, skewSkuPct: 20, skewLinesPct: 80 },
            } as StudyInputsBody['work'],
            routing: ['best+local', 's-shape'],
            batching: ['savings'],
            whatIfs: [{ label: 'Aisle D closed 2–28 m', changes: [{ kind: 'close_aisle', aisle: 'D', fromM: 2, toM: 28 }] }],
          }),
        )
      ).id,
    );
    const v = closed.results.variants[1]!;
    expect(v.unplaced.length).toBeGreaterThan(0);
    expect(v.routing.find((r) => r.key === 's-shape')!.reason).toMatch(/closed aisle stretches/);
    const row = closed.results.whatIf.find((w) => w.method === 'best+local')!;
    expect(row.deltaMetres).toBeNull();
    expect(row.deltaHoursPerDay).toBeNull();
    expect(row.note).toMatch(/different work/);
  }, 120_000);

  it('refuses what-ifs outside the plan before saving anything', async () => {
    const res = await t.as.engineer
      .post(base())
      .set(csrf)
      .send(generated('Bad', 1, { whatIfs: [{ label: 'No such aisle', changes: [{ kind: 'close_aisle', aisle: 'ZZ', fromM: 0, toM: 5 }] }] }));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/aisle ZZ/);
  });

  it('refuses a depot moved outside the plan and a cross aisle where one exists, naming the field', async () => {
    const far = await t.as.engineer
      .post(base())
      .set(csrf)
      .send(generated('Bad depot', 1, { whatIfs: [{ label: 'Depot far away', changes: [{ kind: 'move_depot', xM: 500, yM: 0 }] }] }));
    expect(far.status).toBe(400);
    expect(far.body.error.message).toMatch(/depot .* outside the plan/);
    expect(far.body.error.details).toEqual([expect.objectContaining({ field: 'whatIfs.0.changes.0.xM' })]);
    const twice = await t.as.engineer
      .post(base())
      .set(csrf)
      .send(
        generated('Bad cross aisle', 1, {
          whatIfs: [
            { label: 'Ok', changes: [{ kind: 'add_cross_aisle', yM: 10 }] },
            {
              label: 'Twice',
              changes: [
                { kind: 'add_cross_aisle', yM: 15 },
                { kind: 'add_cross_aisle', yM: 15.2 },
              ],
            },
          ],
        }),
      );
    expect(twice.status).toBe(400);
    expect(twice.body.error.message).toMatch(/already has a cross aisle/);
    expect(twice.body.error.details).toEqual([expect.objectContaining({ field: 'whatIfs.1.changes.1.yM' })]);
    const count = await t.deps.db('studies').where({ name: 'Bad depot' }).orWhere({ name: 'Bad cross aisle' }).count<{ n: number }[]>({ n: '*' });
    expect(count[0]!.n).toBe(0);
  });

  it('says why a what-if row gives no difference when the method does not apply on one plan', () => {
    const row = first.results.whatIf.find((w) => w.method === 'largest-gap')!;
    expect(row.deltaMetres).toBeNull();
    expect(row.note).toMatch(/^does not apply on the what-if: /);
    expect(row.note).toContain(first.results.variants[1]!.routing.find((r) => r.key === 'largest-gap')!.reason!);
  });

  it('counts Held–Karp on the trips it solves and the others at their lower bound (never below the bound, never above a route)', () => {
    const v = first.results.variants[0]!;
    const exact = v.routing.find((r) => r.key === 'exact')!;
    const solvable = v.trips.filter((t) => t.metres.exact !== null);
    expect(solvable.length).toBeGreaterThan(0);
    expect(solvable.length).toBeLessThan(v.trips.length);
    expect(exact.solved).toBe(solvable.length);
    expect(exact.reason).toMatch(new RegExp(`solved ${solvable.length} of ${v.trips.length} trips`));
    // Held–Karp is the optimum: on each solved trip it equals that trip's bound and no method is shorter.
    for (const t of solvable) {
      expect(t.metres.exact).toBeCloseTo(t.lowerBound, 6);
      for (const m of Object.values(t.metres)) if (m !== null) expect(m).toBeGreaterThanOrEqual(t.metres.exact! - 1e-6);
    }
    expect(exact.metres).toBeCloseTo(v.lowerBound, 6);
    const routes = v.routing.filter((r) => r.solved === null && r.metres !== null);
    for (const r of routes) expect(r.metres!).toBeGreaterThanOrEqual(exact.metres! - 1e-6);
    expect(routes.every((r) => r.aboveBestPct! >= 0) && routes.some((r) => r.aboveBestPct === 0)).toBe(true);
  });

  it("keeps the cart's sizes with the study: a rerun after the profile is edited and removed gives the same figures", async () => {
    const made = await t.as.admin.post(`/api/sites/${t.siteId}/cart-profiles`).set(csrf).send({ name: 'Study trolley', totes: 4, maxKg: 60, maxLitres: 120 });
    expect(made.status).toBe(201);
    const body = generated('Small cart', 5, { routing: ['best+local'], batching: ['savings'], whatIfs: [] });
    (body.work as { cartProfileId?: number }).cartProfileId = made.body.id;
    const one = await waitDone((await start(body)).id);
    expect(one.inputs.work.kind === 'generated' && one.inputs.work.cart).toEqual({ totes: 4, maxKg: 60, maxLitres: 120 });
    expect(one.results.cart).toEqual({ totes: 4, maxKg: 60, maxLitres: 120 });
    expect(
      (
        await t.as.admin
          .put(`/api/sites/${t.siteId}/cart-profiles/${made.body.id}`)
          .set(csrf)
          .send({ name: 'Study trolley', totes: 10, maxKg: 200, maxLitres: 500 })
      ).status,
    ).toBe(200);
    const edited = await waitDone((await t.as.engineer.post(`${base()}/${one.id}/rerun`).set(csrf).send({})).body.id);
    expect(figures(edited.results)).toEqual(figures(one.results));
    expect((await t.as.admin.delete(`/api/sites/${t.siteId}/cart-profiles/${made.body.id}`).set(csrf)).status).toBe(200);
    const rerun = await t.as.engineer.post(`${base()}/${one.id}/rerun`).set(csrf).send({});
    expect(rerun.status, JSON.stringify(rerun.body)).toBe(202);
    const removed = await waitDone(rerun.body.id);
    expect(figures(removed.results)).toEqual(figures(one.results));
    expect(removed.results.cart).toEqual({ totes: 4, maxKg: 60, maxLitres: 120 });
  }, 240_000);

  it("batches recorded waves from the orders' arrival, due time and priority, not the released trips' order", async () => {
    const wave = await releaseDemoWave(t, { orders: 12, batching: 'savings' });
    const orders: { id: number; ref: string }[] = await t.deps.db('orders').where({ wave_id: wave.id }).orderBy(['created_at', 'id']).select('id', 'ref');
    expect(orders.length).toBe(12);
    // Due times that interleave the arrival order: the even-numbered arrivals are due first.
    const dueOrder = [...orders.filter((_, i) => i % 2 === 0), ...orders.filter((_, i) => i % 2 === 1)];
    for (const [i, o] of dueOrder.entries())
      await t.deps
        .db('orders')
        .where({ id: o.id })
        .update({ due: new Date(Date.UTC(2026, 11, 5, 8, i)).toISOString(), priority: null });
    const done = await waitDone(
      (await start({ name: 'Recorded FCFS', seed: 1, work: { kind: 'recorded', waveIds: [wave.id] }, routing: ['best+local'], batching: ['fcfs', 'savings'] }))
        .id,
    );
    const v = done.results.variants[0]!;
    const released = v.routing.find((r) => r.key === 'best+local')!.metres!;
    const fcfs = v.batching.find((b) => b.method === 'fcfs')!;
    expect(fcfs.orders).toBe(12);
    // FCFS on the interleaved due times does not replay the savings wave as released.
    expect(Math.abs(fcfs.metres - released)).toBeGreaterThan(0.01);
    // The due times decide FCFS: the same wave with due times in arrival order batches differently.
    for (const [i, o] of orders.entries())
      await t.deps
        .db('orders')
        .where({ id: o.id })
        .update({ due: new Date(Date.UTC(2026, 11, 5, 8, i)).toISOString() });
    const inArrival = await waitDone(
      (await start({ name: 'Recorded FCFS by arrival', seed: 1, work: { kind: 'recorded', waveIds: [wave.id] }, routing: ['best+local'], batching: ['fcfs'] }))
        .id,
    );
    const fcfs2 = inArrival.results.variants[0]!.batching[0]!;
    expect(fcfs2.orders).toBe(12);
    expect(Math.abs(fcfs2.metres - fcfs.metres)).toBeGreaterThan(0.01);
    // Savings does not depend on arrival: it still reproduces the released wave's metres (same engine, same cart).
    expect(v.batching.find((b) => b.method === 'savings')!.metres).toBeCloseTo(released, 0);
  }, 120_000);

  it('deletes a study that is not running; a rerun of it stays', async () => {
    const one = await waitDone((await start(generated('To delete', 9, { routing: ['best+local'], batching: ['savings'], whatIfs: [] }))).id);
    const rerun = await waitDone((await t.as.engineer.post(`${base()}/${one.id}/rerun`).set(csrf).send({})).body.id);
    expect((await t.as.picker.delete(`${base()}/${one.id}`).set(csrf)).status).toBe(403);
    const del = await t.as.engineer.delete(`${base()}/${one.id}`).set(csrf);
    expect(del.status).toBe(200);
    expect((await t.as.engineer.get(`${base()}/${one.id}`)).status).toBe(404);
    expect((await t.as.engineer.delete(`${base()}/${one.id}`).set(csrf)).status).toBe(404);
    const kept = await t.as.engineer.get(`${base()}/${rerun.id}`);
    expect(kept.status).toBe(200);
    expect(kept.body.rerunOf).toBeNull();
    expect(kept.body.results).not.toBeNull();
  }, 120_000);
});
