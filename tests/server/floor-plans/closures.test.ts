import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClosureResult, FloorPlanDetail } from '../../../shared/floor-plans';
import { pairDistance } from '../../../server/core/plan/distances';
import { loadPlanIndex } from '../../../server/floor-plans/plan-index';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { referenceDistancesFrom, toGraphology } from '../../core/plan/fixtures';
import { generatePlan } from './helpers';

/**
 * A single-block plan: aisles A, B, C at x = 0, 4, 8 m, 20 m long, front and back cross aisles.
 * Racks stop 1.5 m from each cross aisle, so 4 bays of 4.25 m have centres at 3.625, 7.875, 12.125, 16.375 m.
 */
const PARAMS = { aisles: 3, aisleLengthM: 20, aisleSpacingM: 4, baysPerAisle: 4, levels: 1 };
const L = 20;

describe('closing and reopening an aisle segment', () => {
  let t: TestApp;
  let planId: number;
  let base: string;
  const distance = async (from: string, to: string) => {
    const res = await t.as.supervisor.get(`${base}/distance`).query({ from, to });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    return res.body.metres as number | null;
  };

  beforeAll(async () => {
    t = await makeTestApp();
    planId = await generatePlan(t.as.supervisor, t.siteId, 'Block', PARAMS);
    base = `/api/sites/${t.siteId}/floor-plans/${planId}`;
    expect((await t.as.supervisor.post(`${base}/activate`).set(csrf)).status).toBe(200);
  });
  afterAll(() => t.close());

  it('starts with the textbook single-block distance', async () => {
    // Bartholdi & Hackman, Warehouse & Distribution Science: across aisles |x1 − x2| + min(y1 + y2, 2L − y1 − y2).
    const [y1, y2] = [3.625, 7.875];
    expect(await distance('A-01-01-1', 'B-02-01-1')).toBeCloseTo(4 + Math.min(y1 + y2, 2 * L - y1 - y2), 9);
    // Same aisle: |y1 − y2|.
    expect(await distance('B-01-01-1', 'B-02-01-2')).toBeCloseTo(7.875 - 3.625, 9);
  });

  it('recomputes distances around a closed stretch and lists no bin when all stay reachable', async () => {
    const res = await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'B', fromM: 5, toM: 6, reason: 'spill' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const r = ClosureResult.parse(res.body);
    expect(r.newlyUnreachable).toEqual([]);
    expect(r.plan.closures).toMatchObject([{ kind: 'aisle', code: 'B', fromM: 5, toM: 6, reason: 'spill', createdBy: { name: 'Sam Supervisor' } }]);
    expect(r.plan.closureVersion).toBe(1);
    // With B's front part cut off from B-02, the walk must use the back cross aisle: |x1 − x2| + 2L − y1 − y2
    // (the same closed form with the front option gone).
    expect(await distance('A-01-01-1', 'B-02-01-1')).toBeCloseTo(4 + 2 * L - 3.625 - 7.875, 9);
    // B-01 is still reached from the front.
    expect(await distance('A-01-01-1', 'B-01-01-1')).toBeCloseTo(4 + 3.625 + 3.625, 9);
  });

  it('lists the bins a second closure cuts off, and they have no distance', async () => {
    const res = await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'B', fromM: 10, toM: 11 });
    expect(res.status).toBe(201);
    const r = ClosureResult.parse(res.body);
    // B-02 (both sides, one level) sits between the two closed stretches.
    expect(r.newlyUnreachable).toEqual(['B-02-01-1', 'B-02-01-2']);
    expect(r.unreachableBins).toEqual(['B-02-01-1', 'B-02-01-2']);
    expect(await distance('A-01-01-1', 'B-02-01-1')).toBeNull();
    const detail = FloorPlanDetail.parse((await t.as.engineer.get(base)).body);
    expect(detail.unreachableBins).toEqual(['B-02-01-1', 'B-02-01-2']);
    expect(detail.openClosures).toBe(2);
  });

  it('stores distances equal to Dijkstra on the same closed graph', async () => {
    // Reference: graphology-shortest-path's Dijkstra (a general-purpose library) on the stored walk graph.
    const loaded = await loadPlanIndex(t.deps.db, planId);
    const g = loaded.graph;
    const depot = loaded.depotNodes[0]!;
    const want = referenceDistancesFrom(toGraphology(g), depot, g.nodeCount);
    let unreached = 0;
    let checked = 0;
    for (let u = 0; u < g.nodeCount; u++) {
      const got = pairDistance(loaded.index, depot, u);
      if (want[u] === Infinity) {
        expect(got).toBe(Infinity);
        unreached++;
      } else expect(got).toBeCloseTo(want[u]!, 9);
      checked++;
    }
    // B-02's access point is the one node the two closures cut off.
    expect(unreached).toBe(1);
    expect(checked).toBe(g.nodeCount);
  });

  it('reopening restores the distance and the bins', async () => {
    const detail = FloorPlanDetail.parse((await t.as.supervisor.get(base)).body);
    for (const c of detail.closures) {
      const res = await t.as.supervisor.delete(`${base}/closures/${c.id}`).set(csrf);
      expect(res.status).toBe(200);
    }
    const after = FloorPlanDetail.parse((await t.as.supervisor.get(base)).body);
    expect(after.closures).toEqual([]);
    expect(after.unreachableBins).toEqual([]);
    expect(after.closureVersion).toBe(4);
    expect(await distance('A-01-01-1', 'B-02-01-1')).toBeCloseTo(4 + 3.625 + 7.875, 9);
    const again = await t.as.supervisor.delete(`${base}/closures/${detail.closures[0]!.id}`).set(csrf);
    expect(again.status).toBe(404);
  });

  it('refuses an unknown aisle or a range outside the aisle, naming the field', async () => {
    const unknown = await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'Q', fromM: 1, toM: 2 });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details).toEqual([{ field: 'code', message: 'aisle Q is not on this plan' }]);
    const outside = await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'A', fromM: 30, toM: 40 });
    expect(outside.status).toBe(400);
    const reversed = await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'A', fromM: 6, toM: 5 });
    expect(reversed.body.error.details).toEqual([{ field: 'toM', message: 'must be greater than fromM' }]);
  });

  it('is for supervisors and admins only', async () => {
    const body = { kind: 'aisle', code: 'A', fromM: 5, toM: 6 };
    expect((await t.as.engineer.post(`${base}/closures`).set(csrf).send(body)).status).toBe(403);
    expect((await t.as.picker.post(`${base}/closures`).set(csrf).send(body)).status).toBe(403);
  });
});
