import { describe, expect, it } from 'vitest';
import { circuitLength } from '../../../server/core/matrix';
import { nearestNeighbor } from '../../../server/core/tour/construct';
import { createLocalSearch, improveLocal, neighborLists } from '../../../server/core/tour/local';
import { bestOrOptGain, bestTwoOptGain } from '../../helpers/moves';
import { isCircuit, randomEuclidean, randomIntegerMatrix, shuffled } from '../../helpers/instances';
import { loadTour, loadTsp, TSPLIB_LARGE_OPTIMA, TSPLIB_OPTIMA } from '../../helpers/tsplib';
import { solveTour } from '../../../server/core/tour/index';
import { steppingClock } from '../../helpers/clock';
import type { DistanceMatrix } from '../../../server/core/matrix';

const maxD = (m: DistanceMatrix): number => m.d.reduce((a, b) => Math.max(a, b), 0);
// The engine promises no move gains more than 1e-9 of the longest distance; twice that absorbs re-summing.
const tol = (m: DistanceMatrix): number => 2e-9 * Math.max(1, maxD(m));

const cases: [string, DistanceMatrix][] = [
  ['random points n=60', randomEuclidean(60, 11)],
  ['random non-metric n=40', randomIntegerMatrix(40, 12)],
  ['berlin52', loadTsp('berlin52').matrix],
  ['st70', loadTsp('st70').matrix],
];

describe('improveLocal', () => {
  // Definition of 2-opt (Croes 1958): checked by an exhaustive move enumerator in tests/helpers/moves.ts.
  it.each(cases)('2-opt alone leaves no improving 2-opt move (%s)', (_, m) => {
    const out = improveLocal(m, shuffled(m.n, 1), undefined, { twoOpt: true, orOpt: false });
    expect(isCircuit(out, m.n, out[0])).toBe(true);
    expect(bestTwoOptGain(m, out)).toBeLessThanOrEqual(tol(m));
  });

  // Definition of Or-opt (Or 1976): segments of 1–3 points, either orientation, any insertion edge.
  it.each(cases)('Or-opt alone leaves no improving segment move (%s)', (_, m) => {
    const out = improveLocal(m, shuffled(m.n, 2), undefined, { twoOpt: false, orOpt: true });
    expect(isCircuit(out, m.n, out[0])).toBe(true);
    expect(bestOrOptGain(m, out)).toBeLessThanOrEqual(tol(m));
  });

  it.each(cases)('both together leave neither move and never lengthen the input (%s)', (_, m) => {
    const input = nearestNeighbor(m, 0);
    const out = improveLocal(m, input);
    expect(bestTwoOptGain(m, out)).toBeLessThanOrEqual(tol(m));
    expect(bestOrOptGain(m, out)).toBeLessThanOrEqual(tol(m));
    expect(circuitLength(m, out)).toBeLessThanOrEqual(circuitLength(m, input));
  });

  it('returns the circuit unchanged when it is already the published optimum', () => {
    // kroA100.opt.tour is optimal (TSPLIB, Reinelt 1991), so no move can shorten it.
    const { matrix } = loadTsp('kroA100');
    const opt = loadTour('kroA100');
    const out = improveLocal(matrix, opt);
    expect(circuitLength(matrix, out)).toBe(TSPLIB_OPTIMA.kroA100);
    const edges = (o: number[]): string[] => o.map((v, i) => [v, o[(i + 1) % o.length]!].sort((a, b) => a - b).join('-')).sort();
    expect(edges(out)).toEqual(edges(opt));
  });

  it('the move checker itself finds improving moves on a shuffled circuit', () => {
    // Guards against a vacuous checker: a random circuit of 30 points is far from 2-opt/Or-opt optimal.
    const m = randomEuclidean(30, 5);
    const order = shuffled(30, 5);
    expect(bestTwoOptGain(m, order)).toBeGreaterThan(0);
    expect(bestOrOptGain(m, order)).toBeGreaterThan(0);
  });

  it('handles 1 to 5 points', () => {
    for (let n = 1; n <= 5; n++) {
      const m = randomIntegerMatrix(n, n);
      const out = improveLocal(m, shuffled(n, n));
      expect(isCircuit(out, n, out[0])).toBe(true);
      if (n >= 4) expect(bestTwoOptGain(m, out)).toBeLessThanOrEqual(tol(m));
    }
  });
});

describe('neighborLists', () => {
  it('lists the k nearest, nearest first, lower index first on ties', () => {
    const pts = [0, 2, 4, 1, 3];
    const m = { n: 5, d: Float64Array.from(pts.flatMap((a) => pts.map((b) => Math.abs(a - b)))) };
    const { k, list } = neighborLists(m, 2);
    expect(k).toBe(2);
    // Point 0 (at 0): 3 (at 1), then 1 (at 2). Point 2 (at 4): 4 (at 3), then 1 (at 2).
    expect(Array.from(list.subarray(0, 2))).toEqual([3, 1]);
    expect(Array.from(list.subarray(4, 6))).toEqual([4, 1]);
    // Point 1 (at 2): 3 (at 1) and 4 (at 3) tie at 1; 3 is the lower index.
    expect(Array.from(list.subarray(2, 4))).toEqual([3, 4]);
  });
});

describe('local with the wide Lin–Kernighan chains', () => {
  // lin318 (optimum 42029: TSPLIB 95, Reinelt 1991). A 2-opt + Or-opt local optimum is typically
  // ≈ 4–5 % above the optimum and Lin–Kernighan ≈ 2 % (D. S. Johnson & L. A. McGeoch, in Local Search
  // in Combinatorial Optimization, Wiley 1997); the narrow chains stopped at 2.35 % here, the wide at 1.44 %.
  it('lin318: run to its local optimum, within 2 % of the proven optimum', () => {
    const { matrix } = loadTsp('lin318');
    const r = solveTour(matrix, { method: 'best', improve: 'local', timeLimitMs: 1e7, clock: steppingClock(0.001) });
    expect(isCircuit(r.order, matrix.n)).toBe(true);
    expect(r.length).toBeGreaterThanOrEqual(TSPLIB_LARGE_OPTIMA.lin318!);
    expect(r.length).toBeLessThanOrEqual(TSPLIB_LARGE_OPTIMA.lin318! * 1.02);
  });
});

describe('rollback after a search stopped on its budget', () => {
  // Regression: rollback emptied the queue from the wrong end, so points still queued when the budget
  // stopped the search stayed marked as queued and the next kick's repair skipped them.
  it('leaves no point marked as queued: the next kick is repaired as from a fresh load', () => {
    const m = randomEuclidean(200, 21);
    const start = improveLocal(
      m,
      Array.from({ length: 200 }, (_, i) => i),
    );
    const expired = { clock: () => 1, deadline: 0, expired: () => true };
    const kickAndRepair = (ls: ReturnType<typeof createLocalSearch>): number => {
      ls.mark();
      ls.doubleBridge(150, 5, 5, 5);
      expect(ls.run(undefined, false)).toBe(true);
      ls.commit();
      return ls.length();
    };
    const fresh = createLocalSearch(m);
    fresh.load(start, []);
    const reference = kickAndRepair(fresh);
    const stopped = createLocalSearch(m);
    stopped.load(start);
    stopped.mark();
    // Every point is queued by load; an expired budget stops the search after its first 63 points.
    expect(stopped.run(expired, false)).toBe(false);
    stopped.rollback();
    expect(Array.from(stopped.tour)).toEqual(start);
    expect(kickAndRepair(stopped)).toBeCloseTo(reference, 9);
  });
});
