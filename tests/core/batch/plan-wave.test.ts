import { describe, expect, it } from 'vitest';
import { planWave, policyComparisonOf } from '../../../server/core/batch/plan-wave';
import type { PlanWaveOptions } from '../../../server/core/batch/plan-wave';
import { isNotApplicable } from '../../../server/core/policy/index';
import { steppingClock } from '../../helpers/clock';
import { closeTo, referenceDistance, toGraphology } from '../plan/fixtures';
import { floorOf, generateOrders } from './fixtures';
import { waveProblems } from './invariants';

const floor = floorOf();
const cart = { totes: 6, maxKg: 60, maxLitres: 150 };
const orders = generateOrders(floor, 11, { orders: 40 });
const base = (extra: Partial<PlanWaveOptions> = {}): PlanWaveOptions => ({
  orders,
  cart,
  batching: 'savings',
  depotNode: floor.depotNode,
  distance: floor.distance,
  // A stepping clock makes every budget a fixed amount of work, independent of machine load.
  clock: steppingClock(0.001),
  ...extra,
});

describe('planWave', () => {
  it.each(['single', 'fcfs', 'seed', 'savings'] as const)('%s: every line once, capacity kept, stops on the trip’s own orders', (batching) => {
    const wave = planWave(base({ batching }));
    expect(waveProblems({ orders, cart, depotNode: floor.depotNode, distance: floor.distance }, wave)).toEqual([]);
    expect(wave.unplaced).toEqual([]);
    expect(wave.totals.orders).toBe(40);
    expect(wave.totals.lines).toBe(orders.reduce((s, o) => s + o.lines.length, 0));
  });

  it('measures each trip as the walk through its numbered stops on a reference shortest-path library', () => {
    // graphology-shortest-path Dijkstra on the same walk graph, independent of the distance index.
    const g = toGraphology(floor.graph);
    const wave = planWave(base());
    for (const trip of wave.trips.slice(0, 4)) {
      const nodes = [floor.depotNode, ...trip.stops.map((s) => s.node), floor.depotNode];
      let metres = 0;
      for (let i = 1; i < nodes.length; i++) metres += referenceDistance(g, nodes[i - 1]!, nodes[i]!);
      expect(closeTo(metres, trip.metres)).toBe(true);
    }
  });

  it('reports totals as sums of its trips and compares them with one order per trip', () => {
    const wave = planWave(base());
    const sum = wave.trips.reduce((s, t) => s + t.metres, 0);
    expect(wave.totals.metres).toBeCloseTo(sum, 9);
    expect(wave.totals.trips).toBe(wave.trips.length);
    const single = planWave(base({ batching: 'single' }));
    // Same routing for both, so the comparison figure is the single-order wave's own total.
    expect(wave.totals.singleMetres).toBeCloseTo(single.totals.metres, 6);
    expect(wave.totals.savingVsSinglePct).toBeCloseTo((1 - wave.totals.metres / single.totals.metres) * 100, 9);
    expect(wave.totals.lowerBound).toBeLessThanOrEqual(wave.totals.metres + 1e-6);
    expect(wave.trips.length).toBeGreaterThan(0);
    for (const t of wave.trips) {
      expect(t.aboveBoundPct).toBeGreaterThanOrEqual(0);
      // From above, on the walk graph's (metric) distances: the bound is at least a minimum spanning tree,
      // which is at least half the optimum (double-tree argument), and nearest neighbor — which best + local
      // never exceeds — is at most (⌈log2 n⌉ + 1)/2 times the optimum (Rosenkrantz, Stearns & Lewis 1977).
      const n = t.stops.length + 1;
      expect(t.aboveBoundPct).toBeLessThanOrEqual(Math.ceil(Math.log2(n)) * 100);
    }
  });

  it('compares with S-shape routing of the same trips on a block layout, and says why not without one', () => {
    const policy = policyComparisonOf(floor.plan, floor.graph);
    if (isNotApplicable(policy)) throw new Error(policy.reason);
    const wave = planWave(base({ policyLayout: policy }));
    expect(wave.totals.sShapeNote).toBeNull();
    for (const t of wave.trips) {
      // S-shape is one closed walk through the same stops on the same aisles, so no shorter than the bound.
      expect(t.sShapeMetres).not.toBeNull();
      expect(t.sShapeMetres!).toBeGreaterThanOrEqual(t.lowerBound - 1e-6);
    }
    expect(wave.totals.sShapeMetres).toBeCloseTo(
      wave.trips.reduce((s, t) => s + t.sShapeMetres!, 0),
      6,
    );
    expect(wave.totals.savingVsSShapePct).toBeGreaterThan(0);
    const without = planWave(base());
    expect(without.totals.sShapeMetres).toBeNull();
    expect(without.totals.sShapeNote).toMatch(/block layout/);
  });

  it('gives a single-order trip on one aisle the S-shape length of the textbook traversal', () => {
    // One stop at depth y in the first aisle, depot 2 m in front of it: S-shape traverses the aisle
    // (Hall 1993, traversal policy; odd aisle count → enter and return), so 2·2 + 2·y metres.
    const bin = floor.plan.bins.findIndex((b) => b.aisle === 'A' && b.bay === 5);
    const y = floor.plan.bins[bin]!.y;
    const node = floor.graph.binNode[bin]!;
    const policy = policyComparisonOf(floor.plan, floor.graph);
    if (isNotApplicable(policy)) throw new Error(policy.reason);
    const one = [{ ref: 'ONE', lines: [{ sku: 'S', qty: 1, node, bin: 'x', unitKg: 1, unitLitres: 1 }] }];
    const wave = planWave(base({ orders: one, policyLayout: policy, batching: 'single' }));
    expect(wave.trips[0]!.sShapeMetres).toBeCloseTo(4 + 2 * y, 9);
    expect(wave.trips[0]!.metres).toBeCloseTo(4 + 2 * y, 9);
  });

  it('groups several lines at one access point into one stop', () => {
    const bins = floor.plan.bins.map((b, i) => ({ b, i })).filter(({ b }) => b.aisle === 'C' && b.bay === 3);
    // Both sides and every level of one bay share an access point.
    expect(new Set(bins.map(({ i }) => floor.graph.binNode[i])).size).toBe(1);
    const node = floor.graph.binNode[bins[0]!.i]!;
    const lines = bins.slice(0, 3).map(({ b }, k) => ({ sku: `S${k}`, qty: 1, node, bin: b.code, unitKg: 1, unitLitres: 1 }));
    const wave = planWave(base({ orders: [{ ref: 'BAY', lines }] }));
    expect(wave.trips[0]!.stops).toHaveLength(1);
    expect(wave.trips[0]!.stops[0]!.bins).toEqual(
      bins
        .slice(0, 3)
        .map(({ b }) => b.code)
        .sort(),
    );
    expect(wave.trips[0]!.stops[0]!.lines).toHaveLength(3);
  });

  it('falls back to best + local when exact cannot take a trip, and says so', () => {
    const wave = planWave(base({ routing: { method: 'exact' } }));
    expect(waveProblems({ orders, cart, depotNode: floor.depotNode, distance: floor.distance }, wave)).toEqual([]);
    const big = wave.trips.filter((t) => t.stops.length > 16);
    expect(big.length).toBeGreaterThan(0);
    for (const t of big) expect(t.method).toBe('best');
    for (const t of wave.trips.filter((t) => t.stops.length <= 16)) {
      expect(t.method).toBe('exact');
      // Held–Karp is optimal, and the bound is a bound: the gap cannot be negative.
      expect(t.metres).toBeGreaterThanOrEqual(t.lowerBound - 1e-6);
    }
    expect(wave.notes.join(' ')).toMatch(/best \+ local/);
  });

  it('keeps every promise when its budget is already spent', () => {
    for (const batching of ['seed', 'savings'] as const) {
      const wave = planWave(base({ batching, timeLimitMs: 0 }));
      expect(wave.batching.budgetExpired).toBe(true);
      expect(waveProblems({ orders, cart, depotNode: floor.depotNode, distance: floor.distance }, wave)).toEqual([]);
    }
  });

  it('reports progress from 0 to 1, never going back', () => {
    const seen: number[] = [];
    planWave(base({ progress: (f) => seen.push(f) }));
    expect(seen.length).toBeGreaterThan(3);
    for (let i = 1; i < seen.length; i++) expect(seen[i]!).toBeGreaterThanOrEqual(seen[i - 1]!);
    expect(seen[0]!).toBeGreaterThanOrEqual(0);
    expect(seen[seen.length - 1]).toBe(1);
  });

  it('gives each order its own totes, consecutive from 1, and a bulky order as many as its volume needs', () => {
    // 25 L per tote: 60 L needs 3 totes.
    const bulky = { ref: 'BULKY', lines: [{ sku: 'B', qty: 4, node: floor.graph.binNode[7]!, bin: floor.plan.bins[7]!.code, unitKg: 1, unitLitres: 15 }] };
    const small = { ref: 'SMALL', lines: [{ sku: 'S', qty: 1, node: floor.graph.binNode[9]!, bin: floor.plan.bins[9]!.code, unitKg: 1, unitLitres: 1 }] };
    const wave = planWave(base({ orders: [bulky, small], batching: 'fcfs' }));
    expect(wave.trips).toHaveLength(1);
    expect(wave.trips[0]!.orders.map((o) => o.totes)).toEqual([[1, 2, 3], [4]]);
  });

  it('estimates minutes as walking at the site speed plus seconds per line and per stop', () => {
    const wave = planWave(base({ estimate: { walkingMps: 0.8, secondsPerLine: 12, secondsPerStop: 5 } }));
    for (const t of wave.trips) {
      const lines = t.stops.reduce((n, s) => n + s.lines.length, 0);
      expect(t.minutes).toBeCloseTo((t.metres / 0.8 + 12 * lines + 5 * t.stops.length) / 60, 9);
    }
    // Defaults: 1.0 m/s (order-picking studies), 10 s per line (common practice).
    const plain = planWave(base());
    expect(plain.trips[0]!.minutes).toBeCloseTo((plain.trips[0]!.metres + 10 * plain.trips[0]!.stops.reduce((n, s) => n + s.lines.length, 0)) / 60, 9);
  });

  it('refuses an unknown routing method', () => {
    expect(() => planWave(base({ routing: { method: 'fastest' as never } }))).toThrow(RangeError);
  });
});
