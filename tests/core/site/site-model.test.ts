import { describe, expect, it } from 'vitest';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { createRng } from '../../../server/core/rng';
import type { PlanBin, PlanGeometry } from '../../../server/core/plan/types';
import { isNotApplicable } from '../../../server/core/policy/types';
import { buildSiteModel, routeTrip, SiteModelError, slotOrders, slotReason, type RouteMethod } from '../../../server/core/site/index';
import { closeTo, randomIrregularPlan, referenceDistancesFrom, toGraphology } from '../plan/fixtures';

/**
 * A plan small enough to work by hand: aisles A (x = 0) and B (x = 3), each 10 m long (y 0–10), a front
 * cross aisle at y = 0 and a back one at y = 10, the depot 2 m in front of aisle A at (0, −2).
 * Bins: A-02 and B-02 at y = 2, B-06 at y = 6, and OFF-1 on aisle A at y = 15 (beyond the aisle's end).
 */
function handPlan(): PlanGeometry {
  const bin = (code: string, aisle: string, y: number): PlanBin => ({ code, aisle, y, bay: null, side: 'L', level: 1, zone: null });
  return {
    aisles: [
      { code: 'A', x: 0, yStart: 0, yEnd: 10 },
      { code: 'B', x: 3, yStart: 0, yEnd: 10 },
    ],
    crossAisles: [
      { code: 'front', y: 0, xStart: 0, xEnd: 3 },
      { code: 'back', y: 10, xStart: 0, xEnd: 3 },
    ],
    bins: [bin('A-02', 'A', 2), bin('B-02', 'B', 2), bin('B-06', 'B', 6), bin('OFF-1', 'A', 15)],
    depots: [{ code: 'D', x: 0, y: -2 }],
  };
}

/** Site models of `count` seeded random irregular plans with closures, each with its graph rebuilt in graphology. */
function* randomModels(seed: number, count: number) {
  const rng = createRng(seed);
  for (let t = 0; t < count; t++) {
    const { plan, closures } = randomIrregularPlan(rng);
    const m = buildSiteModel({ geometry: plan, closures });
    yield { t, rng, plan, m, ref: toGraphology(m.graph) };
  }
}

describe('buildSiteModel', () => {
  it('measures the hand-worked plan: depot link, aisle and cross-aisle metres added by hand', () => {
    const m = buildSiteModel({ geometry: handPlan() });
    const a2 = m.binNode('A-02')!;
    const b2 = m.binNode('B-02')!;
    const b6 = m.binNode('B-06')!;
    // Access points lie on the aisle centre line at the bin's y.
    expect([m.graph.x[a2], m.graph.y[a2]]).toEqual([0, 2]);
    expect([m.graph.x[b6], m.graph.y[b6]]).toEqual([3, 6]);
    // By hand: depot → front of A is 2 m; A-02 is 2 m up aisle A; B is 3 m along the front cross aisle.
    expect(m.distance(m.depotNode, a2)).toBeCloseTo(4, 9);
    expect(m.distance(m.depotNode, b2)).toBeCloseTo(2 + 3 + 2, 9);
    expect(m.distance(a2, b2)).toBeCloseTo(2 + 3 + 2, 9);
    // A-02 → B-06: by the front 2 + 3 + 6 = 11, by the back 8 + 3 + 4 = 15.
    expect(m.distance(a2, b6)).toBeCloseTo(11, 9);
    expect(m.binNode('OFF-1')).toBeUndefined();
    expect(m.binIndex('OFF-1')).toBe(3);
    expect(m.binIndex('NOPE')).toBeUndefined();
    // The block layout: one block, the depot 2 m off the front cross aisle.
    expect(isNotApplicable(m.layout)).toBe(false);
    if (!isNotApplicable(m.layout)) expect([m.layout.blocks, m.layout.depots[0]!.offset]).toEqual([1, 2]);
    expect(m.stopOf(b6)).toEqual({ aisle: 1, y: 6 });
  });

  it('equals graphology Dijkstra on every node pair of 60 random irregular plans with closures, and reaches what Dijkstra reaches', () => {
    let pairs = 0;
    let unreached = 0;
    for (const { t, m, ref } of randomModels(20261205, 60)) {
      // Reference: graphology-shortest-path single-source Dijkstra (general-purpose library).
      const fromDepot = referenceDistancesFrom(ref, m.depotNode, m.graph.nodeCount);
      for (let a = 0; a < m.graph.nodeCount; a += 3) {
        const expected = referenceDistancesFrom(ref, a, m.graph.nodeCount);
        for (let b = 0; b < m.graph.nodeCount; b++) {
          if (!closeTo(m.distance(a, b), expected[b]!)) throw new Error(`plan ${t}: d(${a}, ${b}) = ${m.distance(a, b)}, Dijkstra says ${expected[b]}`);
          pairs++;
        }
      }
      for (let u = 0; u < m.graph.nodeCount; u++) {
        expect(m.reachesDepot(u)).toBe(fromDepot[u] !== Infinity);
        if (fromDepot[u] === Infinity) unreached++;
      }
    }
    expect(pairs).toBeGreaterThan(10_000);
    // The sample has to cut some nodes off, or the reach check proves little.
    expect(unreached).toBeGreaterThan(0);
  });

  it('refuses a depot the plan does not have, and turns policies off while a stretch is closed', () => {
    expect(() => buildSiteModel({ geometry: handPlan(), depotIdx: 1 })).toThrow(SiteModelError);
    expect(() => buildSiteModel({ geometry: handPlan(), depotIdx: 1 })).toThrow('the plan has no depot number 2');
    const closed = buildSiteModel({ geometry: handPlan(), closures: [{ kind: 'aisle', code: 'B', from: 4, to: 8 }] });
    expect(isNotApplicable(closed.layout) ? closed.layout.reason : null).toMatch(/closed aisle stretches/);
    expect(closed.stopOf(closed.binNode('B-02')!)).toBeNull();
  });
});

describe('slotOrders', () => {
  const line = (bin: string, sku = `SKU-${bin}`) => ({ sku, qty: 1, bin, unitKg: 1, unitLitres: 1 });
  it('slots lines on their access points and names the one problem of each order left out', () => {
    // Aisle B closed from 4 m to 8 m: B-06 (y = 6) lies strictly inside the stretch and is cut off.
    const m = buildSiteModel({ geometry: handPlan(), closures: [{ kind: 'aisle', code: 'B', from: 4, to: 8 }] });
    const r = slotOrders(m, [
      { ref: 'OK', due: '2026-12-05T08:00:00Z', priority: 1, lines: [line('A-02'), line('B-02')] },
      { ref: 'UNKNOWN', due: null, priority: null, lines: [line('A-02'), line('Z-9')] },
      { ref: 'OFF', due: null, priority: null, lines: [line('OFF-1')] },
      { ref: 'CUT', due: null, priority: null, lines: [line('B-06', 'SKU-7')] },
    ]);
    expect(r.orders.map((o) => o.ref)).toEqual(['OK']);
    expect(r.orders[0]!.due).toBe(Date.UTC(2026, 11, 5, 8));
    expect(r.orders[0]!.priority).toBe(1);
    expect(r.orders[0]!.lines.map((l) => [l.bin, m.graph.x[l.node], m.graph.y[l.node]])).toEqual([
      ['A-02', 0, 2],
      ['B-02', 3, 2],
    ]);
    expect(r.unslotted).toEqual([
      { order: 'UNKNOWN', code: 'unknown_bin', reason: 'bin Z-9 of SKU SKU-Z-9 is not on the floor plan' },
      { order: 'OFF', code: 'bin_off_plan', reason: 'bin OFF-1 of SKU SKU-OFF-1 has no access point on its aisle' },
      { order: 'CUT', code: 'unreachable', reason: 'bin B-06 of SKU SKU-7 cannot be reached from the depot' },
    ]);
    expect(slotReason('unreachable', 'B-06', 'SKU-7')).toBe(r.unslotted[2]!.reason);
  });
});

describe('routeTrip', () => {
  it('routes the hand-worked two-stop trip by every kind of method', () => {
    const m = buildSiteModel({ geometry: handPlan() });
    const stops = [m.binNode('A-02')!, m.binNode('B-02')!];
    // By hand: depot → A-02 4 m, A-02 → B-02 7 m, B-02 → depot 7 m: 18 m, the only circuit.
    for (const method of ['nearest-neighbor+none', 'best+local', 'best+deep', 'exact', 'return', 'ratliff-rosenthal'] as RouteMethod[]) {
      const r = routeTrip(m, stops, method);
      expect([method, r.length]).toEqual([method, expect.closeTo(18, 9)]);
      expect(r.reason).toBeNull();
    }
    // S-shape with two pick aisles walks both end to end: 10 + 3 + 10 + 3, plus the 2 m depot link twice (Hall 1993, S-shape traversal).
    const s = routeTrip(m, stops, 's-shape');
    expect(s.length).toBeCloseTo(30, 9);
    expect(s.path![0]).toEqual({ x: 0, y: -2 });
    // Largest gap walks the first and last pick aisles end to end (Hall 1993): here the same 30 m.
    expect(routeTrip(m, stops, 'largest-gap').length).toBeCloseTo(30, 9);
    // Local search restarted from the S-shape order still finds the 18 m circuit.
    expect(routeTrip(m, stops, 'sorted-edges+local', { restartFromSShape: true }).length).toBeCloseTo(18, 9);
  });

  it('says why a policy does not apply, and why exact declines a trip over 16 stops', () => {
    const closed = buildSiteModel({ geometry: handPlan(), closures: [{ kind: 'aisle', code: 'A', from: 8, to: 9 }] });
    const r = routeTrip(closed, [closed.binNode('A-02')!], 's-shape');
    expect(r.length).toBeNull();
    expect(r.reason).toMatch(/closed aisle stretches/);
    // 4 aisles × 10 bays on both sides: 40 access points, 17 of them taken as one trip.
    const big = buildSiteModel({ geometry: generateRectangularPlan({ aisles: 4, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 10, levels: 1 }) });
    const nodes = [...new Set(big.geometry.bins.map((b) => big.binNode(b.code)!))].slice(0, 17);
    expect(nodes).toHaveLength(17);
    expect(routeTrip(big, nodes, 'exact')).toEqual({ length: null, visits: [], reason: 'more than 16 stops' });
    const sixteen = routeTrip(big, nodes.slice(0, 16), 'exact');
    expect(sixteen.length).toBeGreaterThan(0);
    expect(sixteen.length!).toBeLessThanOrEqual(routeTrip(big, nodes.slice(0, 16), 'best+local').length! + 1e-9);
  });

  it('exact and best + local equal the shortest circuit found by enumerating every order on graphology distances', () => {
    let trips = 0;
    let local = 0;
    for (const { rng, plan, m, ref } of randomModels(4242, 40)) {
      const candidates = [
        ...new Set(plan.bins.map((b) => m.binNode(b.code)).filter((n): n is number => n !== undefined && m.reachesDepot(n) && n !== m.depotNode)),
      ];
      if (candidates.length < 3) continue;
      const k = Math.min(candidates.length, 3 + rng.int(4));
      const stops = Array.from({ length: k }, () => candidates.splice(rng.int(candidates.length), 1)[0]!).sort((a, b) => a - b);
      // Reference: graphology Dijkstra distances between depot and stops, every visiting order enumerated.
      const pts = [m.depotNode, ...stops];
      const d = pts.map((p) => referenceDistancesFrom(ref, p, m.graph.nodeCount));
      let best = Infinity;
      const permute = (rest: number[], at: number, len: number): void => {
        if (rest.length === 0) {
          best = Math.min(best, len + d[at]![pts[0]!]!);
          return;
        }
        for (const i of rest)
          permute(
            rest.filter((j) => j !== i),
            i,
            len + d[at]![pts[i]!]!,
          );
      };
      permute(
        stops.map((_, i) => i + 1),
        0,
        0,
      );
      const exact = routeTrip(m, stops, 'exact');
      expect(exact.length!).toBeCloseTo(best, 6);
      expect([...exact.visits].sort((a, b) => a - b)).toEqual(stops.map((_, i) => i));
      const bl = routeTrip(m, stops, 'best+local');
      // A heuristic: never below the optimum, and on trips this small within 10 % of it (common practice for 2-opt + Or-opt).
      expect(bl.length!).toBeGreaterThanOrEqual(best - 1e-6);
      expect(bl.length!).toBeLessThanOrEqual(best * 1.1 + 1e-6);
      if (Math.abs(bl.length! - best) < 1e-6) local++;
      trips++;
    }
    expect(trips).toBeGreaterThan(20);
    expect(local).toBeGreaterThan(trips / 2);
  });
});
