/**
 * Regression: a study of a recorded wave with a what-if closure that cuts off one of the wave's stops
 * used to take the whole server down (`Fatal JavaScript invalid size error` in the study worker).
 * The cut-off stop is an unreachable stop: left out of its trip and reported, as for generated work.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadPlanIndex, activePlanId } from '../../../server/floor-plans/plan-index';
import type { StudyDetail, StudyResults } from '../../../shared/studies';
import type { WaveDetail } from '../../../shared/waves';
import { csrf, type TestApp } from '../../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../../helpers/waves';

let t: TestApp;
let wave: WaveDetail;
const base = () => `/api/sites/${t.siteId}/studies`;

async function waitEnd(id: number): Promise<StudyDetail> {
  for (let i = 0; i < 1200; i++) {
    const res = await t.as.engineer.get(`${base()}/${id}`);
    expect(res.status).toBe(200);
    const s = res.body as StudyDetail;
    if (s.status !== 'queued' && s.status !== 'running') return s;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('study did not finish in 120 s');
}

beforeAll(async () => {
  t = await makeDemoApp();
  wave = await releaseDemoWave(t, { orders: 12, batching: 'savings' });
}, 120_000);
afterAll(() => t.close());

describe('a recorded-wave study with a closure over one of its stops', () => {
  it('finishes, leaves the cut-off stop out of its trip and reports its orders as unreachable', async () => {
    // The first stop of the first trip, and where its bin lies on the plan.
    const trip = (await t.deps.db('trips').where({ wave_id: wave.id }).orderBy('n').first<{ id: number }>('id'))!;
    const stop = (await t.deps.db('stops').where({ trip_id: trip.id }).orderBy('n').first<{ bins: string }>('bins'))!;
    const binCode = (JSON.parse(stop.bins) as string[])[0]!;
    const plan = await loadPlanIndex(t.deps.db, (await activePlanId(t.deps.db, t.siteId))!);
    const bin = plan.geometry.bins.find((b) => b.code === binCode)!;
    const cutOff = plan.geometry.bins.filter((b) => b.aisle === bin.aisle && Math.abs(b.y - bin.y) < 0.01).map((b) => b.code);
    const orderRefs: string[] = await t.deps
      .db('pick_lines')
      .join('stops', 'stops.id', 'pick_lines.stop_id')
      .where('stops.trip_id', trip.id)
      .whereIn('pick_lines.bin', cutOff)
      .distinct('pick_lines.order_ref')
      .pluck('pick_lines.order_ref');
    expect(orderRefs.length).toBeGreaterThan(0);

    // A short stretch around the bin's access point: both walks into it are cut, nothing else is.
    const res = await t.as.engineer
      .post(base())
      .set(csrf)
      .send({
        name: 'Closure over a stop',
        seed: 1,
        work: { kind: 'recorded', waveIds: [wave.id] },
        routing: ['best+local', 'exact', 's-shape'],
        batching: ['savings'],
        whatIfs: [
          { label: `Aisle ${bin.aisle} closed at the stop`, changes: [{ kind: 'close_aisle', aisle: bin.aisle, fromM: bin.y - 0.4, toM: bin.y + 0.4 }] },
        ],
      });
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const done = await waitEnd(res.body.id as number);
    expect(done.status, done.error ?? '').toBe('done');
    const results = done.results as StudyResults;

    const [asIs, closed] = results.variants;
    // The plan as it is keeps every stop; the closed plan drops exactly the cut-off one from trip 1.
    expect(closed!.trips[0]!.nodes.length).toBe(asIs!.trips[0]!.nodes.length - 1);
    for (const tr of closed!.trips) for (const m of Object.values(tr.metres)) if (m !== null) expect(Number.isFinite(m)).toBe(true);
    for (const o of orderRefs) {
      const u = closed!.unplaced.find((x) => x.order === o);
      expect(u, `order ${o} reported`).toBeDefined();
      expect(u!.reason).toMatch(/cannot be reached/);
    }
    // One report per order, however many tables met it.
    expect(new Set(closed!.unplaced.map((u) => u.order)).size).toBe(closed!.unplaced.length);
    expect(asIs!.unplaced).toEqual([]);
    // Less work on the closed plan: no difference is claimed, and the note says why.
    expect(closed!.lines).toBeLessThan(asIs!.lines);
    const row = results.whatIf.find((w) => w.method === 'best+local')!;
    expect(row.deltaMetres).toBeNull();
    expect(row.note).toMatch(/different work/);
  }, 180_000);

  it('still answers other requests afterwards', async () => {
    expect((await t.anon.get('/api/health')).status).toBe(200);
    expect((await t.as.engineer.get(base())).status).toBe(200);
  });
});

describe('confirmedWalk on a plan where a closure cut off a confirmed stop', () => {
  it('measures the walk through the stops still reachable, never Infinity', async () => {
    const { generateRectangularPlan } = await import('../../../server/core/plan/generate');
    const { engineParams } = await import('../../../server/floor-plans/floor-plans.service');
    const { DEMO_PLAN_PARAMS } = await import('../../../server/floor-plans/demo-seed');
    const { buildPlan, confirmedWalk } = await import('../../../server/studies/study-engine');
    const geometry = generateRectangularPlan(engineParams(DEMO_PLAN_PARAMS));
    const [a, cut, c] = [geometry.bins[10]!, geometry.bins[700]!, geometry.bins[1500]!];
    const open = buildPlan({ geometry, closures: [], depotIdx: 0 });
    const closed = buildPlan({ geometry, closures: [{ kind: 'aisle', code: cut.aisle, from: cut.y - 0.4, to: cut.y + 0.4 }], depotIdx: 0 });
    expect(closed.reachesDepot(closed.binNode(cut.code)!)).toBe(false);
    const walked = confirmedWalk(closed, [[a.code], [cut.code], [c.code]]);
    expect(Number.isFinite(walked)).toBe(true);
    // The short closure lies away from a and c, so their circuit is the same on both plans.
    expect(walked).toBeCloseTo(confirmedWalk(open, [[a.code], [c.code]]), 6);
  });
});
