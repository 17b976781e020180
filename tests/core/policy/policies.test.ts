import { describe, expect, it } from 'vitest';
import { circuitLength } from '../../../server/core/matrix';
import { blockLayoutOf } from '../../../server/core/policy/layout';
import { combined, largestGap, midpoint, POLICIES, returnPolicy, sShape } from '../../../server/core/policy/policies';
import { ratliffRosenthal } from '../../../server/core/policy/ratliff-rosenthal';
import type { PolicyResult, PolicyRoute } from '../../../server/core/policy/types';
import { isNotApplicable } from '../../../server/core/policy/types';
import { createRng } from '../../../server/core/rng';
import { heldKarp } from '../../../server/core/tour/exact';
import { blockMatrix, circuitOf, randomStops, routeProblem } from './helpers';

function route(r: PolicyResult): PolicyRoute {
  if (isNotApplicable(r)) throw new Error(r.reason);
  return r;
}

const ALL = Object.entries(POLICIES);

// Hand-worked: 3 aisles at x = 0, 5, 10 m, 10 m long, depot at the front of the first aisle.
const small = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 10 });

describe('routing policies on a single block, worked by hand', () => {
  it('stops 1 m deep in every aisle: return 26 m, S-shape 42 m, midpoint and largest gap 42 m', () => {
    const stops = [0, 1, 2].map((aisle) => ({ aisle, y: 1 }));
    // Return: 3 × 2 m in and out + 10 m out and 10 m back along the front.
    expect(route(returnPolicy(small, 0, stops)).length).toBeCloseTo(26, 12);
    // S-shape: up 10, across 5, down 10, across 5, in and out 2 (third aisle, odd count), back 10.
    const s = route(sShape(small, 0, stops));
    expect(s.length).toBeCloseTo(42, 12);
    expect(s.order).toEqual([0, 1, 2]);
    // Midpoint / largest gap: outer aisles traversed (10 + 10), back 10, front 10, middle from the front 2.
    expect(route(midpoint(small, 0, stops)).length).toBeCloseTo(42, 12);
    expect(route(largestGap(small, 0, stops)).length).toBeCloseTo(42, 12);
    expect(route(combined(small, 0, stops)).length).toBeCloseTo(26, 12);
  });

  it('stops 9 m deep in every aisle: return 74 m, S-shape 58 m, midpoint, largest gap and combined 42 m', () => {
    const stops = [0, 1, 2].map((aisle) => ({ aisle, y: 9 }));
    expect(route(returnPolicy(small, 0, stops)).length).toBeCloseTo(3 * 18 + 20, 12);
    expect(route(sShape(small, 0, stops)).length).toBeCloseTo(10 + 5 + 10 + 5 + 18 + 10, 12);
    // The middle aisle is entered from the back: 1 m in, 1 m out.
    const m = route(midpoint(small, 0, stops));
    expect(m.length).toBeCloseTo(42, 12);
    expect(m.order).toEqual([0, 1, 2]);
    expect(route(largestGap(small, 0, stops)).length).toBeCloseTo(42, 12);
    expect(route(combined(small, 0, stops)).length).toBeCloseTo(42, 12);
  });

  it('a single stop is an out-and-back under every policy, from a depot in the middle', () => {
    // Depot at x = 5, stop 4 m into the aisle at x = 10: 5 + 4 + 4 + 5.
    const stops = [{ aisle: 2, y: 4 }];
    for (const [name, policy] of ALL) {
      const r = route(policy(small, 5, stops));
      expect(r.length, name).toBeCloseTo(18, 12);
      expect(routeProblem(small, 5, stops, r), name).toBeNull();
    }
  });

  it('largest gap takes the stops on each side of the gap from that side', () => {
    // 4 aisles; middle aisles: stops at 2 and 8 (largest gap 2→8, taken 2 from the front and 2 from the back).
    const layout = blockLayoutOf({ aisles: 4, aisleSpacing: 5, aisleLength: 10 });
    const stops = [
      { aisle: 0, y: 5 },
      { aisle: 1, y: 2 },
      { aisle: 1, y: 8 },
      { aisle: 3, y: 5 },
    ];
    // Outer aisles 10 + 10, back 15, front 15, middle aisle 2 × 2 + 2 × 2.
    const r = route(largestGap(layout, 0, stops));
    expect(r.length).toBeCloseTo(58, 12);
    expect(r.order).toEqual([0, 2, 3, 1]);
    // Midpoint splits at 5 m the same way here.
    expect(route(midpoint(layout, 0, stops)).length).toBeCloseTo(58, 12);
  });

  it('every policy returns a zero-length route for an empty trip', () => {
    for (const [name, policy] of ALL) {
      const r = route(policy(small, 3, []));
      expect(r.length, name).toBe(0);
      expect(r.path, name).toEqual([{ x: 3, y: 0 }]);
    }
  });
});

describe('multi-block S-shape (Roodbergen & de Koster 2001), worked by hand', () => {
  // 3 aisles at x = 0, 5, 10 m; cross aisles at 0, 10, 20 m; depot at x = 0.
  const two = blockLayoutOf({ aisles: 3, aisleSpacing: 5, aisleLength: 20, blocks: 2 });

  it('goes up the left pick aisle to the farthest block, S-shapes there, and comes down', () => {
    const stops = [
      { aisle: 0, y: 5 },
      { aisle: 2, y: 15 },
      { aisle: 1, y: 12 },
    ];
    // Up aisle 1 to the middle cross aisle picking at 5 (10), across to aisle 2 (5), traverse it (10),
    // across the back to aisle 3 (5), down to the middle cross aisle (10), on down the same aisle
    // through the empty front block (10), back along the front (10) = 60 m.
    const r = route(sShape(two, 0, stops));
    expect(r.length).toBeCloseTo(60, 12);
    expect(r.order).toEqual([0, 2, 1]);
    expect(routeProblem(two, 0, stops, r)).toBeNull();
  });

  it('enters and leaves the only pick subaisle of the farthest block from its front', () => {
    const stops = [{ aisle: 2, y: 15 }];
    // Along the front 10, up 10, in 5 and out 5, down 10, back 10.
    expect(route(sShape(two, 0, stops)).length).toBeCloseTo(50, 12);
  });

  it('refuses the single-block policies on a two-block layout with a reason', () => {
    for (const policy of [returnPolicy, midpoint, largestGap, combined]) {
      const r = policy(two, 0, [{ aisle: 1, y: 3 }]);
      expect(isNotApplicable(r) && r.reason).toMatch(/single-block/);
    }
  });

  // Oracle: Held–Karp on grid distances along the cross aisles (see blockMatrix).
  it('is never shorter than the exact optimum and is always a real walk, 2–4 blocks', () => {
    const rng = createRng(2001);
    for (const blocks of [2, 3, 4]) {
      for (const depotX of [0, 7.5, 27]) {
        const layout = blockLayoutOf({ aisles: 10, aisleSpacing: 3, aisleLength: 30, blocks, depotX });
        for (let rep = 0; rep < 40; rep++) {
          const stops = randomStops(rng, layout, 1 + rng.int(10));
          const r = route(sShape(layout, depotX, stops));
          expect(routeProblem(layout, depotX, stops, r)).toBeNull();
          const m = blockMatrix(layout, depotX, stops);
          expect(r.length).toBeGreaterThanOrEqual(heldKarp(m).length - 1e-9);
          expect(circuitLength(m, circuitOf(r.order))).toBeLessThanOrEqual(r.length + 1e-9);
        }
      }
    }
  });
});

describe('routing policies against the exact optimum on random single-block trips', () => {
  // Ratliff & Rosenthal is checked against Held–Karp in ratliff-rosenthal.test.ts.
  it('no policy is shorter than Ratliff–Rosenthal; each route is a real walk of the reported length', () => {
    const rng = createRng(1993);
    for (const depotX of [0, 13.5, 15, 30]) {
      const layout = blockLayoutOf({ aisles: 10, aisleSpacing: 3, aisleLength: 20, depotX });
      for (let rep = 0; rep < 150; rep++) {
        const stops = randomStops(rng, layout, 1 + rng.int(30));
        const exact = route(ratliffRosenthal(layout, depotX, stops)).length;
        const m = blockMatrix(layout, depotX, stops);
        const lengths: Record<string, number> = {};
        for (const [name, policy] of ALL) {
          const r = route(policy(layout, depotX, stops));
          expect(routeProblem(layout, depotX, stops, r), name).toBeNull();
          expect(r.length, name).toBeGreaterThanOrEqual(exact - 1e-9);
          // The stop order, walked by shortest paths, can only be shorter than the policy's own walk.
          expect(circuitLength(m, circuitOf(r.order)), name).toBeLessThanOrEqual(r.length + 1e-9);
          lengths[name] = r.length;
        }
        // Combined chooses per aisle between S-shape's and return's moves, so it is never worse than either.
        expect(lengths.combined!).toBeLessThanOrEqual(lengths['s-shape']! + 1e-9);
        expect(lengths.combined!).toBeLessThanOrEqual(lengths.return! + 1e-9);
      }
    }
  });
});
