/**
 * `deep` (iterated local search with Lin–Kernighan-style chains and local double-bridge kicks) against
 * the published optima of TSPLIB (Reinelt 1991; ../shared/reference/tsplib/README.md), the undo log
 * behind its kicks, and the budgets of every method under a stepping clock (work counted in clock
 * readings, never wall time).
 */
import { describe, expect, it } from 'vitest';
import { circuitLength, type DistanceMatrix } from '../../../server/core/matrix';
import { createRng } from '../../../server/core/rng';
import { alphaNeighbors } from '../../../server/core/tour/alpha';
import { budgetOf } from '../../../server/core/tour/budget';
import { sortedEdges } from '../../../server/core/tour/construct';
import type { ImproveMode, TourMethod } from '../../../server/core/tour/index';
import { solveTour } from '../../../server/core/tour/index';
import { createLocalSearch, neighborLists } from '../../../server/core/tour/local';
import { steppingClock } from '../../helpers/clock';
import { isCircuit, randomEuclidean } from '../../helpers/instances';
import { loadTsp, TSPLIB_LARGE_OPTIMA, TSPLIB_OPTIMA } from '../../helpers/tsplib';

describe('deep on TSPLIB', () => {
  // Published optima (TSPLIB 95, Reinelt 1991): a correct circuit is never shorter, and these small
  // instances are where an LKH-class search must land exactly.
  it.each(['burma14', 'ulysses16', 'ulysses22', 'att48', 'eil51', 'berlin52', 'st70', 'kroA100'])(
    '%s: reaches the published optimum within a fixed amount of work',
    (name) => {
      const { matrix } = loadTsp(name);
      const r = solveTour(matrix, { method: 'best', improve: 'deep', timeLimitMs: 4, clock: steppingClock(0.001), seed: 1 });
      expect(isCircuit(r.order, matrix.n)).toBe(true);
      expect(r.length).toBe(TSPLIB_OPTIMA[name]);
    },
  );

  // pr439 (clustered, optimum 107217: TSPLIB 95, Reinelt 1991): the k-opt search, its kicks, the
  // several searches and their merge on a fixed amount of work. Measured on this work over seeds 1–5:
  // 0.002, 0.149, 0.041, 0.081 and 0.046 % above the optimum (with the previous 2-opt-chain search the
  // seeds split into two basins, 0.04 % and 0.85 %, hence the bound then was 1 %).
  it('pr439: within 0.25 % of the proven optimum within a fixed amount of work', () => {
    const { matrix } = loadTsp('pr439');
    const r = solveTour(matrix, { method: 'best', improve: 'deep', timeLimitMs: 20, clock: steppingClock(0.001), seed: 1 });
    expect(isCircuit(r.order, matrix.n)).toBe(true);
    expect(r.length).toBeGreaterThanOrEqual(TSPLIB_LARGE_OPTIMA.pr439!);
    expect(r.length).toBeLessThanOrEqual(TSPLIB_LARGE_OPTIMA.pr439! * 1.0025);
  });
});

/**
 * 300 kicks, each repaired by the local search from a mark: the reported change must be the true change in
 * circuit length (under penalties too: they cancel over a circuit), an improving kick is kept and any other
 * rolled back to the exact circuit before it. Returns how many were kept.
 */
function kickAndRepair(
  m: DistanceMatrix,
  ls: ReturnType<typeof createLocalSearch>,
  rng: ReturnType<typeof createRng>,
  kick: (rng: ReturnType<typeof createRng>) => void,
): number {
  let kept = 0;
  for (let k = 0; k < 300; k++) {
    const before = Array.from(ls.tour);
    const lenBefore = circuitLength(m, before);
    ls.mark();
    kick(rng);
    ls.run(undefined, false);
    expect(circuitLength(m, ls.tour)).toBeCloseTo(lenBefore + ls.change(), 6);
    expect(ls.length()).toBeCloseTo(circuitLength(m, ls.tour), 6);
    if (ls.change() < 0) {
      ls.commit();
      kept++;
    } else {
      ls.rollback();
      expect(Array.from(ls.tour)).toEqual(before);
    }
    expect(new Set(ls.tour).size).toBe(m.n);
  }
  return kept;
}

describe('local search undo log', () => {
  it('a kick and its repair rolled back give the circuit back exactly; change() is the true length change', () => {
    const { matrix: m } = loadTsp('kroA100');
    const ls = createLocalSearch(m, undefined, neighborLists(m, 10));
    ls.load(sortedEdges(m, 0));
    ls.run(undefined, true);
    const kept = kickAndRepair(m, ls, createRng(3), (rng) => ls.swapSegments(ls.positionOf(rng.int(m.n)) + 1, 1 + rng.int(20), 1 + rng.int(20)));
    // The check is not vacuous: some kicks were kept and the rest rolled back.
    expect(kept).toBeGreaterThan(0);
    expect(kept).toBeLessThan(300);
  });
});

describe('double-bridge kick', () => {
  it('puts three segments in reverse order, each the same way round, and returns the length change', () => {
    const m = randomEuclidean(20, 4);
    const ls = createLocalSearch(m, undefined, neighborLists(m, 10));
    const start = Array.from({ length: 20 }, (_, i) => i);
    ls.load(start);
    const before = circuitLength(m, start);
    // Positions 18, 19, 0 | 1, 2 | 3 (wrapping round the array): … 17 [18 19 0] [1 2] [3] 4 … → … 17 3 1 2 18 19 0 4 …
    const delta = ls.doubleBridge(18, 3, 2, 1);
    const expected = [18, 19, 0, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 3, 1, 2];
    const rot = (o: number[]): number[] => {
      const at = o.indexOf(4);
      return [...o.slice(at), ...o.slice(0, at)];
    };
    expect(rot(Array.from(ls.tour))).toEqual(rot(expected));
    expect(circuitLength(m, ls.tour)).toBeCloseTo(before + delta, 9);
    expect(ls.change()).toBeCloseTo(delta, 9);
  });

  it('kicks and repairs under α-nearness lists (π-penalised search) roll back exactly; change() is the true change', () => {
    const { matrix: m } = loadTsp('kroA200');
    const upper = circuitLength(m, sortedEdges(m, 0));
    const nb = alphaNeighbors(m, { k: 10, upper, budget: budgetOf({}), maxSteps: 20 })!;
    expect(nb.pi!.some((p) => p !== 0)).toBe(true);
    const ls = createLocalSearch(m, undefined, nb);
    ls.load(sortedEdges(m, 0));
    ls.run(undefined, false);
    const kept = kickAndRepair(m, ls, createRng(5), (rng) =>
      ls.doubleBridge(ls.positionOf(rng.int(m.n)) + 1, 1 + rng.int(20), 1 + rng.int(20), 1 + rng.int(20)),
    );
    expect(kept).toBeGreaterThan(0);
    expect(kept).toBeLessThan(300);
  });
});

describe('budgets at scale (stepping clock: 0.1 ms per reading)', () => {
  const combos: [TourMethod, ImproveMode][] = [
    ['nearest-neighbor', 'none'],
    ['repeated-nearest-neighbor', 'none'],
    ['sorted-edges', 'none'],
    ['best', 'none'],
    ['best', 'local'],
    ['repeated-nearest-neighbor', 'local'],
    ['best', 'deep'],
  ];
  for (const n of [400, 1500]) {
    const m = randomEuclidean(n, n);
    it.each(combos)(`${n} points, %s + %s: answers within its budget +10 % (+5 ms) with a valid circuit`, (method, improve) => {
      const limit = 20;
      const r = solveTour(m, { method, improve, timeLimitMs: limit, clock: steppingClock(0.1), seed: 1 });
      expect(r.ms).toBeLessThanOrEqual(limit * 1.1 + 5);
      expect(isCircuit(r.order, n)).toBe(true);
    });
  }
});
