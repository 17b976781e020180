import { describe, expect, it } from 'vitest';
import { buildDistanceIndex, tripMatrix } from '../../../server/core/plan/distances';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { RectangularPlanParams } from '../../../server/core/plan/generate';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import type { BlockLayout } from '../../../server/core/policy/layout';
import { stopOfBin, toBlockLayout } from '../../../server/core/policy/layout';
import { sShape } from '../../../server/core/policy/policies';
import { ratliffRosenthal } from '../../../server/core/policy/ratliff-rosenthal';
import type { PolicyResult, PolicyRoute, PolicyStop } from '../../../server/core/policy/types';
import { isNotApplicable } from '../../../server/core/policy/types';
import { createRng } from '../../../server/core/rng';
import { heldKarp } from '../../../server/core/tour/exact';
import { routeProblem } from './helpers';

function route(r: PolicyResult): PolicyRoute {
  if (isNotApplicable(r)) throw new Error(r.reason);
  return r;
}

/** Random bins of a generated plan as stops, with the walk-graph node of each and of the depot. */
function trips(params: RectangularPlanParams, seed: number, count: number) {
  const plan = generateRectangularPlan(params);
  const layout = toBlockLayout(plan) as BlockLayout;
  const graph = buildWalkGraph(plan);
  const index = buildDistanceIndex(graph);
  const rng = createRng(seed);
  return Array.from({ length: count }, () => {
    const bins = Array.from({ length: 1 + rng.int(10) }, () => rng.int(plan.bins.length));
    const stops: PolicyStop[] = bins.map((b) => stopOfBin(layout, plan.bins[b]!)!);
    const m = tripMatrix(index, [graph.depotNode[0]!, ...bins.map((b) => graph.binNode[b]!)]);
    return { layout, stops, exact: heldKarp(m).length };
  });
}

describe('policies on generated floor plans, against the walk graph', () => {
  // Independent path to the same answer: the plan's walk graph and its shortest distances (tested
  // against graphology Dijkstra in tests/core/plan), then Held–Karp. The depot's link to the front
  // cross aisle is walked twice on the graph and is not part of a policy's length.
  it.each([
    ['depot front left', { at: 'front_left' } as const],
    ['depot between aisles', { at: 'custom', x: 7.5 } as const],
  ])('Ratliff–Rosenthal plus the depot link equals Held–Karp on the walk graph (%s)', (_name, depot) => {
    const params = { aisles: 6, aisleLengthM: 24, aisleSpacingM: 3, baysPerAisle: 8, levels: 2, depot };
    for (const t of trips(params, 77, 40)) {
      const depotX = t.layout.depots[0]!.x;
      const r = route(ratliffRosenthal(t.layout, depotX, t.stops));
      expect(r.length + 2 * t.layout.depots[0]!.offset).toBeCloseTo(t.exact, 6);
      expect(routeProblem(t.layout, depotX, t.stops, r)).toBeNull();
    }
  });

  it('S-shape with a middle cross aisle is a real walk and never beats Held–Karp on the walk graph', () => {
    const params = { aisles: 6, aisleLengthM: 30, aisleSpacingM: 3, baysPerAisle: 10, levels: 1, crossAisles: { middle: 1 } };
    for (const t of trips(params, 78, 40)) {
      const depotX = t.layout.depots[0]!.x;
      const r = route(sShape(t.layout, depotX, t.stops));
      expect(routeProblem(t.layout, depotX, t.stops, r)).toBeNull();
      expect(r.length + 2 * t.layout.depots[0]!.offset).toBeGreaterThanOrEqual(t.exact - 1e-6);
    }
  });
});
