import { describe, expect, it } from 'vitest';
import { circuitLength } from '../../../server/core/matrix';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { BlockLayout } from '../../../server/core/policy/layout';
import { blockLayoutOf, toBlockLayout } from '../../../server/core/policy/layout';
import { ratliffRosenthal } from '../../../server/core/policy/ratliff-rosenthal';
import type { PolicyResult, PolicyRoute, PolicyStop } from '../../../server/core/policy/types';
import { isNotApplicable } from '../../../server/core/policy/types';
import { createRng } from '../../../server/core/rng';
import { heldKarp } from '../../../server/core/tour/exact';
import { blockMatrix, circuitOf, randomStops, routeProblem } from './helpers';

function route(r: PolicyResult): PolicyRoute {
  if (isNotApplicable(r)) throw new Error(r.reason);
  return r;
}

describe('ratliffRosenthal', () => {
  // Oracle: Held–Karp on the textbook single-block distances (Bartholdi & Hackman); both are exact, so
  // the lengths must agree, and the stop order read off the tour must itself be an optimal circuit.
  it('equals Held–Karp on random single-block trips of 1–12 stops, depot anywhere on the front', () => {
    const shapes = [
      { aisles: 10, aisleSpacing: 3, aisleLength: 20 },
      { aisles: 4, aisleSpacing: 5, aisleLength: 10 },
      { aisles: 15, aisleSpacing: 2.5, aisleLength: 30 },
    ];
    let cases = 0;
    for (const [si, shape] of shapes.entries()) {
      const xMax = (shape.aisles - 1) * shape.aisleSpacing;
      // At the first aisle, on an inner aisle, between aisles, beyond the last aisle.
      const depots = [0, shape.aisleSpacing * 2, shape.aisleSpacing * 1.5, xMax + 4];
      for (const depotX of depots) {
        const layout = blockLayoutOf({ ...shape, depotX });
        const rng = createRng(1000 * si + Math.round(depotX * 10) + 7);
        for (let count = 1; count <= 12; count++) {
          for (let rep = 0; rep < 5; rep++) {
            const stops = randomStops(rng, layout, count);
            const m = blockMatrix(layout, depotX, stops);
            const exact = heldKarp(m);
            const rr = route(ratliffRosenthal(layout, depotX, stops));
            expect(rr.length).toBeCloseTo(exact.length, 7);
            expect(circuitLength(m, circuitOf(rr.order))).toBeCloseTo(exact.length, 7);
            expect(routeProblem(layout, depotX, stops, rr)).toBeNull();
            cases++;
          }
        }
      }
    }
    expect(cases).toBe(3 * 4 * 12 * 5);
  });

  it('equals Held–Karp when stops share positions or sit on the cross aisles', () => {
    const layout = blockLayoutOf({ aisles: 6, aisleSpacing: 4, aisleLength: 12, depotX: 6 });
    const rng = createRng(42);
    for (let rep = 0; rep < 60; rep++) {
      // Depths from a coarse grid, so repeats and the ends 0 and 12 come up often.
      const stops = Array.from({ length: 2 + rng.int(9) }, () => ({ aisle: rng.int(6), y: 3 * rng.int(5) }));
      const m = blockMatrix(layout, 6, stops);
      const rr = route(ratliffRosenthal(layout, 6, stops));
      // Oracle: Held–Karp on the Bartholdi & Hackman distances.
      expect(rr.length).toBeCloseTo(heldKarp(m).length, 9);
      expect(routeProblem(layout, 6, stops, rr)).toBeNull();
    }
  });

  it('walks into each aisle from the front when every stop is near the front', () => {
    // 3 aisles 5 m apart, 10 m long, depot at the first; stops 1 m deep in each: 3 × 2 m + 2 × 10 m.
    const layout = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 10 });
    const stops = [0, 1, 2].map((aisle) => ({ aisle, y: 1 }));
    const rr = route(ratliffRosenthal(layout, 0, stops));
    expect(rr.length).toBeCloseTo(26, 12);
    expect(rr.order).toEqual([0, 1, 2]);
  });

  it('goes round the block and dips into the middle aisle from the back when the stops are near the back', () => {
    // Stops 9 m deep: up the first aisle, across the back, down the last, back along the front = 40 m,
    // plus 2 × 1 m into the middle aisle from the back.
    const layout = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 10 });
    const stops = [0, 1, 2].map((aisle) => ({ aisle, y: 9 }));
    const rr = route(ratliffRosenthal(layout, 0, stops));
    expect(rr.length).toBeCloseTo(42, 12);
    expect(routeProblem(layout, 0, stops, rr)).toBeNull();
  });

  it('returns a zero-length route at the depot for an empty trip', () => {
    const layout = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 10, depotX: 7 });
    const rr = route(ratliffRosenthal(layout, 7, []));
    expect(rr.length).toBe(0);
    expect(rr.order).toEqual([]);
    expect(rr.path).toEqual([{ x: 7, y: 0 }]);
  });

  it('gives a reason instead of a route on a layout with a middle cross aisle', () => {
    const layout = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 20, blocks: 2 });
    const r = ratliffRosenthal(layout, 0, [{ aisle: 1, y: 3 }]);
    expect(isNotApplicable(r) && r.reason).toMatch(/single-block/);
  });

  it('gives a reason for a stop outside its aisle or on an aisle the layout does not have', () => {
    const layout = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 10 });
    expect(isNotApplicable(ratliffRosenthal(layout, 0, [{ aisle: 3, y: 1 }]))).toBe(true);
    expect(isNotApplicable(ratliffRosenthal(layout, 0, [{ aisle: 0, y: 11 }]))).toBe(true);
  });

  it('reports the path in plan coordinates when the depot is at the high-y end of the plan', () => {
    const plan = generateRectangularPlan({ aisles: 4, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 5, levels: 1 });
    // Turn the plan round: y → 20 − y, so the depot is now beyond the back (high-y) end.
    const flipped = {
      ...plan,
      bins: plan.bins.map((b) => ({ ...b, y: 20 - b.y })),
      depots: plan.depots.map((d) => ({ ...d, y: 20 - d.y })),
    };
    const layout = toBlockLayout(flipped) as BlockLayout;
    expect(layout.depthSign).toBe(-1);
    const stops: PolicyStop[] = [{ aisle: 2, y: 15 }]; // 5 m from the front end (y = 20)
    const rr = route(ratliffRosenthal(layout, 0, stops));
    // Textbook distance (Bartholdi & Hackman): 6 m along the front, 5 m in, and back.
    expect(rr.length).toBeCloseTo(22, 12);
    expect(rr.path[0]).toEqual({ x: 0, y: 20 });
    expect(rr.path.some((p) => p.x === 6 && p.y === 15)).toBe(true);
    expect(routeProblem(layout, 0, stops, rr)).toBeNull();
  });
});
