/**
 * The Lin–Kernighan-style chains with the or-3opt alternative (sequential 3-opt segment insertion, Lin
 * & Kernighan 1973) in server/core/tour/local.ts: every move keeps a permutation, the length the search
 * reports changing is the true change and never an increase, an undo restores the circuit, and one
 * descent reaches the published optimum of small TSPLIB instances (TSPLIB 95, Reinelt 1991;
 * ../shared/reference/tsplib/README.md). No timing: the searches run without a budget.
 */
import { describe, expect, it } from 'vitest';
import type { DistanceMatrix } from '../../../server/core/matrix';
import { circuitLength, matrixFromFunction } from '../../../server/core/matrix';
import { createRng } from '../../../server/core/rng';
import { nearestNeighbor } from '../../../server/core/tour/construct';
import type { LocalMoves } from '../../../server/core/tour/local';
import { createLocalSearch, LK_BREADTH_NARROW, LK_BREADTH_WIDE, neighborLists } from '../../../server/core/tour/local';
import { isCircuit, randomEuclidean, randomIntegerMatrix, shuffled } from '../../helpers/instances';
import { loadTsp, TSPLIB_OPTIMA } from '../../helpers/tsplib';

const CHAINS_OR3: LocalMoves = { twoOpt: false, orOpt: false, lk: true, or3: true, lkBreadth: LK_BREADTH_WIDE };
const CHAINS_ONLY: LocalMoves = { twoOpt: false, orOpt: false, lk: true, lkBreadth: LK_BREADTH_WIDE };
const ALL_WIDE: LocalMoves = { twoOpt: true, orOpt: true, lk: true, or3: true, lkBreadth: LK_BREADTH_WIDE };
const ALL_NARROW: LocalMoves = { twoOpt: true, orOpt: true, lk: true, or3: true, lkBreadth: LK_BREADTH_NARROW };

const tol = (m: DistanceMatrix): number =>
  1e-6 *
  Math.max(
    1,
    circuitLength(
      m,
      Array.from({ length: m.n }, (_, i) => i),
    ),
  );

describe('or-3opt chains: validity and exact gain accounting', () => {
  const instances: [string, () => DistanceMatrix][] = [];
  for (let s = 0; s < 6; s++) instances.push([`random points n=60 seed ${s}`, () => randomEuclidean(60, s)]);
  for (let s = 0; s < 3; s++) instances.push([`random non-metric n=40 seed ${s}`, () => randomIntegerMatrix(40, 100 + s)]);
  instances.push(['st70', () => loadTsp('st70').matrix]);

  it.each(instances)('%s: a permutation, change() is the true change, never longer (every move set)', (_, make) => {
    const m = make();
    for (const moves of [CHAINS_OR3, CHAINS_ONLY, ALL_WIDE, ALL_NARROW]) {
      for (const start of [shuffled(m.n, 7), nearestNeighbor(m, 0)]) {
        const ls = createLocalSearch(m, moves, neighborLists(m, 10));
        ls.load(start);
        const before = circuitLength(m, start);
        expect(ls.run(undefined, false)).toBe(true);
        const after = circuitLength(m, ls.tour);
        expect(
          isCircuit(
            [...ls.tour].sort((a, b) => a - b),
            m.n,
            0,
          ),
        ).toBe(true);
        expect(after).toBeLessThanOrEqual(before + tol(m));
        // The search's own account of the change must match the circuit it holds (a chain undone
        // in a mirrored array once sent t4 to the wrong side and counted a gain that was not there).
        expect(Math.abs(before + ls.change() - after)).toBeLessThanOrEqual(tol(m));
      }
    }
  });

  it('rollback after a descent with or-3opt chains restores the circuit exactly', () => {
    const m = randomEuclidean(80, 42);
    const ls = createLocalSearch(m, CHAINS_OR3, neighborLists(m, 10));
    const start = shuffled(m.n, 3);
    ls.load(start);
    const held = Array.from(ls.tour);
    ls.mark();
    ls.run(undefined, false);
    expect(circuitLength(m, ls.tour)).toBeLessThan(circuitLength(m, held));
    ls.rollback();
    expect(Array.from(ls.tour)).toEqual(held);
  });
});

describe('or-3opt chains: quality against outside facts', () => {
  // Points in convex position: the optimal circuit visits them in hull order (an optimal Euclidean
  // circuit never crosses itself — Flood 1956). Start from the hull order with blocks of 5–9 points
  // moved elsewhere (direction kept): segment insertions the Or-opt move (≤ 3 points) cannot undo.
  it('convex polygon with long blocks moved: the chains alone find the hull order', () => {
    const n = 48;
    const pts = Array.from({ length: n }, (_, i) => [Math.cos((2 * Math.PI * i) / n), Math.sin((2 * Math.PI * i) / n)] as const);
    const m = matrixFromFunction(n, (i, j) => 100 * Math.hypot(pts[i]![0] - pts[j]![0], pts[i]![1] - pts[j]![1]));
    const hull = Array.from({ length: n }, (_, i) => i);
    const optimum = circuitLength(m, hull);
    const rng = createRng(5);
    for (let trial = 0; trial < 10; trial++) {
      const order = [...hull];
      for (let k = 0; k < 2; k++) {
        const len = 5 + rng.int(5);
        const at = rng.int(order.length - len);
        const block = order.splice(at, len);
        const to = rng.int(order.length + 1);
        order.splice(to, 0, ...block);
      }
      const ls = createLocalSearch(m, CHAINS_OR3, neighborLists(m, 10));
      ls.load(order);
      ls.run(undefined, false);
      expect(circuitLength(m, ls.tour)).toBeCloseTo(optimum, 6);
    }
  });

  // One descent (2-opt, Or-opt and the wide chains, 10 nearest) from nearest neighbor: with the
  // or-3opt alternative it lands on the published optimum of eil51 (426) and berlin52 (7542) (TSPLIB
  // 95, Reinelt 1991). Measured here, not a theorem: without the alternative the same descent stops
  // at 427 and 7902; over the eight small instances it is never longer with it than without.
  it('eil51 and berlin52: one descent reaches the published optimum', () => {
    for (const name of ['eil51', 'berlin52']) {
      const { matrix } = loadTsp(name);
      const ls = createLocalSearch(matrix, ALL_WIDE, neighborLists(matrix, 10));
      ls.load(nearestNeighbor(matrix, 0));
      ls.run(undefined, false);
      expect(
        isCircuit(
          [...ls.tour].sort((a, b) => a - b),
          matrix.n,
          0,
        ),
      ).toBe(true);
      expect(circuitLength(matrix, ls.tour)).toBe(TSPLIB_OPTIMA[name]);
    }
  });

  it('on the small TSPLIB instances the or-3opt alternative never leaves a longer local optimum', () => {
    for (const name of Object.keys(TSPLIB_OPTIMA)) {
      const { matrix } = loadTsp(name);
      const lengths = [ALL_WIDE, { ...ALL_WIDE, or3: false }].map((moves) => {
        const ls = createLocalSearch(matrix, moves, neighborLists(matrix, 10));
        ls.load(nearestNeighbor(matrix, 0));
        ls.run(undefined, false);
        return circuitLength(matrix, ls.tour);
      });
      expect(lengths[0]).toBeGreaterThanOrEqual(TSPLIB_OPTIMA[name]!);
      expect(lengths[0]).toBeLessThanOrEqual(lengths[1]!);
    }
  });
});
