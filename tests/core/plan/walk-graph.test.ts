import { describe, expect, it } from 'vitest';
import { diagnosePlan } from '../../../server/core/plan/diagnostics';
import { buildDistanceIndex, pairDistance } from '../../../server/core/plan/distances';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { PlanGeometry } from '../../../server/core/plan/types';
import { DEPOT_LINK_MAX_M } from '../../../server/core/plan/types';
import { NODE_ACCESS, NODE_DEPOT, NODE_DEPOT_LINK, NODE_JUNCTION, buildWalkGraph, edgeCount } from '../../../server/core/plan/walk-graph';

const small = (over: Partial<Parameters<typeof generateRectangularPlan>[0]> = {}): PlanGeometry =>
  generateRectangularPlan({ aisles: 3, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 4, levels: 3, ...over });

function neighbours(g: ReturnType<typeof buildWalkGraph>, u: number): Map<number, number> {
  const m = new Map<number, number>();
  for (let k = g.offsets[u]!; k < g.offsets[u + 1]!; k++) m.set(g.targets[k]!, g.lengths[k]!);
  return m;
}

describe('buildWalkGraph', () => {
  it('gives every bin of one bay, both sides and every level, the same access point', () => {
    const plan = small();
    const g = buildWalkGraph(plan);
    const byBay = new Map<string, Set<number>>();
    plan.bins.forEach((b, i) => {
      const key = `${b.aisle}/${b.bay}`;
      if (!byBay.has(key)) byBay.set(key, new Set());
      byBay.get(key)!.add(g.binNode[i]!);
    });
    expect(byBay.size).toBe(3 * 4);
    for (const nodes of byBay.values()) expect(nodes.size).toBe(1);
    const distinct = new Set(g.binNode);
    expect(distinct.size).toBe(3 * 4);
    for (const u of distinct) {
      expect(g.kind[u]! & NODE_ACCESS).toBeTruthy();
      expect(g.aisle[u]).toBeGreaterThanOrEqual(0);
    }
  });

  it('merges bins whose positions differ by less than the tolerance and keeps wider gaps apart', () => {
    const plan = small({ aisles: 1, baysPerAisle: 1, levels: 1, bothSides: false });
    const y = plan.bins[0]!.y;
    plan.bins.push({ ...plan.bins[0]!, code: 'near', y: y + 0.004 }, { ...plan.bins[0]!, code: 'far', y: y + 0.05 });
    const g = buildWalkGraph(plan);
    expect(g.binNode[1]).toBe(g.binNode[0]);
    expect(g.binNode[2]).not.toBe(g.binNode[0]);
  });

  it('puts a junction where each aisle centre line meets each cross aisle, on both', () => {
    const plan = small({ crossAisles: { front: true, back: true, middle: 1 } });
    const g = buildWalkGraph(plan);
    const junctions: number[] = [];
    for (let u = 0; u < g.nodeCount; u++) if (g.kind[u]! & NODE_JUNCTION) junctions.push(u);
    expect(junctions.length).toBe(3 * 3);
    for (const u of junctions) {
      const a = plan.aisles[g.aisle[u]!]!;
      const c = plan.crossAisles[g.crossAisle[u]!]!;
      expect([g.x[u], g.y[u]]).toEqual([a.x, c.y]);
    }
  });

  it('joins consecutive points of a centre line with edges as long as the gap between them', () => {
    const plan = small({ aisles: 2, baysPerAisle: 2, levels: 1, bothSides: false });
    const g = buildWalkGraph(plan);
    // Aisle A: front junction (0), bay 1, bay 2, back junction (20); the cross aisles join A and B.
    const front = g.binNode[0]! - 1;
    const ys = [0, plan.bins[0]!.y, plan.bins[1]!.y, 20];
    for (let i = 0; i < 3; i++) expect(neighbours(g, front + i).get(front + i + 1)).toBeCloseTo(ys[i + 1]! - ys[i]!, 12);
    const frontB = g.binNode[2]! - 1;
    expect(neighbours(g, front).get(frontB)).toBe(3);
    // 4 points per aisle: 3 edges each, 2 cross-aisle edges, 1 depot link.
    expect(edgeCount(g)).toBe(2 * 3 + 2 + 1);
  });

  it('links a front-left depot to the existing junction in front of the first aisle', () => {
    const plan = small();
    const g = buildWalkGraph(plan);
    const link = g.depotLink[0]!;
    expect(g.kind[link]! & NODE_JUNCTION).toBeTruthy();
    expect(g.kind[link]! & NODE_DEPOT_LINK).toBeTruthy();
    expect([g.x[link], g.y[link]]).toEqual([0, 0]);
    const depot = g.depotNode[0]!;
    expect(g.kind[depot]).toBe(NODE_DEPOT);
    expect(neighbours(g, depot)).toEqual(new Map([[link, 2]]));
  });

  it('links a depot between aisles to a new point on the front cross aisle', () => {
    const plan = small({ aisles: 4, depot: { at: 'front_centre' } });
    const g = buildWalkGraph(plan);
    const link = g.depotLink[0]!;
    expect(g.kind[link]).toBe(NODE_DEPOT_LINK);
    expect(g.crossAisle[link]).toBe(0);
    expect(g.aisle[link]).toBe(-1);
    expect([g.x[link], g.y[link]]).toEqual([4.5, 0]);
    // The new point splits the front cross-aisle edge between aisles B and C.
    expect([...neighbours(g, link).values()].sort()).toEqual([1.5, 1.5, 2]);
  });

  it('links a depot beside an aisle to the nearest point of that aisle centre line', () => {
    const plan = small();
    plan.depots = [{ code: 'side', x: 7.5, y: 9 }];
    const g = buildWalkGraph(plan);
    const link = g.depotLink[0]!;
    expect(g.aisle[link]).toBe(2);
    expect([g.x[link], g.y[link]]).toEqual([6, 9]);
    expect(neighbours(g, g.depotNode[0]!).get(link)).toBe(1.5);
  });

  it('leaves a depot unlinked when every centre line is farther than the link limit', () => {
    const plan = small();
    plan.depots.push({ code: 'far', x: 0, y: -(DEPOT_LINK_MAX_M + 0.5) });
    const g = buildWalkGraph(plan);
    expect(g.depotLink[1]).toBe(-1);
    expect(g.offsets[g.depotNode[1]! + 1]! - g.offsets[g.depotNode[1]!]!).toBe(0);
    const problems = diagnosePlan(plan, g);
    expect(problems).toEqual([expect.objectContaining({ code: 'depot_unlinked', entity: 'depot', index: 1, severity: 'error' })]);
  });

  it('is deterministic', () => {
    const plan = small({ crossAisles: { front: true, back: true, middle: 2 }, depot: { at: 'front_centre' } });
    expect(buildWalkGraph(plan)).toEqual(buildWalkGraph(plan));
  });
});

describe('closures', () => {
  it('cut the stretch they cover: bins inside are unreachable and diagnostics list exactly them', () => {
    const plan = small({ baysPerAisle: 8, levels: 2 });
    const closures = [{ kind: 'aisle' as const, code: 'B', from: 6, to: 12 }];
    const g = buildWalkGraph(plan, closures);
    const inside = plan.bins.map((b, i) => (b.aisle === 'B' && b.y > 6 && b.y < 12 ? i : -1)).filter((i) => i >= 0);
    expect(inside.length).toBeGreaterThan(0);
    const listed = diagnosePlan(plan, g, closures)
      .filter((p) => p.code === 'bin_unreachable')
      .map((p) => p.index);
    expect(listed).toEqual(inside);
    const ix = buildDistanceIndex(g);
    for (const b of inside) expect(pairDistance(ix, g.depotNode[0]!, g.binNode[b]!)).toBe(Infinity);
  });

  it('keep a point at the closure end reachable from the open side', () => {
    const plan = small({ aisles: 1, baysPerAisle: 2, levels: 1, bothSides: false, crossAisles: { front: true, back: false } });
    const y1 = plan.bins[1]!.y;
    const closures = [{ kind: 'aisle' as const, code: 'A', from: y1, to: 30 }];
    const g = buildWalkGraph(plan, closures);
    const ix = buildDistanceIndex(g);
    expect(pairDistance(ix, g.depotNode[0]!, g.binNode[1]!)).toBeCloseTo(2 + y1, 12);
  });

  it('force the walk round the other end of the aisle', () => {
    // Single block, aisles 3 m apart, 20 m long; aisle B closed between two bins. From y1 below to
    // y2 above the closure the walk leaves B at the front, goes up A (or C) and enters B from the back:
    // y1 + 3 + 20 + 3 + (20 − y2) (geometry of the layout, worked by hand).
    const plan = small({ baysPerAisle: 8, levels: 1, bothSides: false });
    const bBins = plan.bins.map((b, i) => [b, i] as const).filter(([b]) => b.aisle === 'B');
    const [lowBin, low] = bBins[2]!;
    const [highBin, high] = bBins[5]!;
    const closures = [{ kind: 'aisle' as const, code: 'B', from: lowBin.y + 0.5, to: highBin.y - 0.5 }];
    const g = buildWalkGraph(plan, closures);
    const ix = buildDistanceIndex(g);
    const expected = lowBin.y + 3 + 20 + 3 + (20 - highBin.y);
    expect(pairDistance(ix, g.binNode[low]!, g.binNode[high]!)).toBeCloseTo(expected, 9);
    expect(pairDistance(ix, g.binNode[low]!, g.binNode[high]!)).toBeGreaterThan(highBin.y - lowBin.y);
  });

  it('on a cross aisle cut the walk between the aisles on either side', () => {
    const plan = small({ aisles: 2, crossAisles: { front: true, back: false } });
    const closures = [{ kind: 'cross_aisle' as const, code: 'front', from: 1, to: 2 }];
    const g = buildWalkGraph(plan, closures);
    const problems = diagnosePlan(plan, g, closures);
    const unreachable = problems.filter((p) => p.code === 'bin_unreachable').map((p) => plan.bins[p.index]!.aisle);
    expect(new Set(unreachable)).toEqual(new Set(['B']));
    expect(unreachable.length).toBe(plan.bins.filter((b) => b.aisle === 'B').length);
  });
});

describe('diagnosePlan', () => {
  it('returns no problem for a generated plan', () => {
    const plan = small({ crossAisles: { front: true, back: true, middle: 1 } });
    expect(diagnosePlan(plan, buildWalkGraph(plan))).toEqual([]);
  });

  it('names an aisle that touches no cross aisle, and its bins as unreachable', () => {
    const plan = small();
    plan.aisles[1] = { ...plan.aisles[1]!, yStart: 1, yEnd: 19 };
    const g = buildWalkGraph(plan);
    const problems = diagnosePlan(plan, g);
    expect(problems[0]).toEqual(expect.objectContaining({ code: 'aisle_no_cross_aisle', entity: 'aisle', index: 1 }));
    const bins = problems.filter((p) => p.code === 'bin_unreachable').map((p) => p.index);
    expect(bins).toEqual(plan.bins.map((b, i) => (b.aisle === 'B' ? i : -1)).filter((i) => i >= 0));
  });

  it('warns about an aisle with no bins without calling it an error', () => {
    const plan = small();
    plan.bins = plan.bins.filter((b) => b.aisle !== 'C');
    const problems = diagnosePlan(plan, buildWalkGraph(plan));
    expect(problems).toEqual([expect.objectContaining({ severity: 'warning', code: 'aisle_no_bins', index: 2 })]);
  });

  it('reports a plan without depots once, not every bin', () => {
    const plan = small();
    plan.depots = [];
    expect(diagnosePlan(plan, buildWalkGraph(plan))).toEqual([expect.objectContaining({ code: 'no_depot', entity: 'plan', index: -1 })]);
  });

  it('reports a depot that links but cannot reach the first depot', () => {
    const plan = small();
    plan.aisles.push({ code: 'Z', x: 50, yStart: 0, yEnd: 10 });
    plan.depots.push({ code: 'island', x: 51, y: 5 });
    const problems = diagnosePlan(plan, buildWalkGraph(plan));
    expect(problems.map((p) => [p.code, p.index])).toEqual([
      ['aisle_no_cross_aisle', 3],
      ['depot_unreachable', 1],
      ['aisle_no_bins', 3],
    ]);
  });

  it('tells a bin on an unknown aisle from a bin outside its aisle', () => {
    const plan = small();
    plan.bins[0] = { ...plan.bins[0]!, aisle: 'Q' };
    plan.bins[1] = { ...plan.bins[1]!, y: 25 };
    const g = buildWalkGraph(plan);
    expect(g.binNode[0]).toBe(-1);
    expect(g.binNode[1]).toBe(-1);
    const problems = diagnosePlan(plan, g);
    expect(problems.map((p) => [p.code, p.index])).toEqual([
      ['bin_unknown_aisle', 0],
      ['bin_outside_aisle', 1],
    ]);
  });

  it('reports a closure on an unknown cross aisle', () => {
    const plan = small();
    const closures = [{ kind: 'cross_aisle' as const, code: 'nowhere', from: 0, to: 1 }];
    expect(diagnosePlan(plan, buildWalkGraph(plan, closures), closures)).toEqual([
      expect.objectContaining({ code: 'closure_unknown', entity: 'closure', index: 0 }),
    ]);
  });
});
