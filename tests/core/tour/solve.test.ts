import { describe, expect, it } from 'vitest';
import { circuitLength, matrixFromRows } from '../../../server/core/matrix';
import { streamsFor } from '../../../server/core/tour/deep';
import type { ImproveMode, SolveTourResult, TourMethod } from '../../../server/core/tour/index';
import { heldKarp, solveTour, TimeLimitError } from '../../../server/core/tour/index';
import { steppingClock } from '../../helpers/clock';
import { isCircuit, randomEuclidean } from '../../helpers/instances';
import { loadTsp, TSPLIB_OPTIMA } from '../../helpers/tsplib';

const names = Object.keys(TSPLIB_OPTIMA);
const heuristics: TourMethod[] = ['nearest-neighbor', 'repeated-nearest-neighbor', 'sorted-edges', 'best'];
const improvements: ImproveMode[] = ['none', 'local', 'deep'];

describe('solveTour on TSPLIB', () => {
  // Published optima (TSPLIB README table, Reinelt 1991): a valid circuit is never shorter.
  // From above: nearest neighbor is at most (⌈log2 n⌉ + 1)/2 times the optimum on metric instances
  // (Rosenkrantz, Stearns & Lewis 1977), greedy / sorted edges likewise (Ong & Moore 1984; bound from
  // memory); repeated NN and best are never longer than those, and improvement never lengthens a circuit.
  it.each(names)('%s: every method and improvement gives a valid circuit between the optimum and the worst-case bound', (name) => {
    const { matrix } = loadTsp(name);
    const opt = TSPLIB_OPTIMA[name]!;
    const worstCase = ((Math.ceil(Math.log2(matrix.n)) + 1) / 2) * opt;
    const budgetMs = 30;
    const step = 0.01;
    for (const method of heuristics) {
      for (const improve of improvements) {
        // A stepping clock makes the budget a fixed amount of work, independent of machine load.
        const r = solveTour(matrix, { method, improve, timeLimitMs: budgetMs, seed: 7, clock: steppingClock(step) });
        expect(r.method).toBe(method);
        expect(r.improve).toBe(improve);
        expect(isCircuit(r.order, matrix.n, 0)).toBe(true);
        expect(r.length).toBe(circuitLength(matrix, r.order));
        expect(r.length).toBeGreaterThanOrEqual(opt);
        expect(r.length).toBeLessThanOrEqual(worstCase);
        // The clock was read at least twice, and the run ends within its budget (a few readings of overrun).
        expect(r.ms).toBeGreaterThan(0);
        expect(r.ms).toBeLessThanOrEqual(budgetMs + 10 * step);
      }
    }
  });

  // TSPLIB optima for burma14 (3323) and ulysses16 (6859), GEO distance per the README there.
  it.each(['burma14', 'ulysses16'])('%s: exact reaches the published optimum through solveTour', (name) => {
    const { matrix } = loadTsp(name);
    const r = solveTour(matrix, { method: 'exact', improve: 'local' });
    expect(r.length).toBe(TSPLIB_OPTIMA[name]);
    expect(r.improve).toBe('none');
  });

  it('refuses exact above 16 stops', () => {
    expect(() => solveTour(loadTsp('ulysses22').matrix, { method: 'exact' })).toThrow(/limited to 16 stops/);
  });

  it('best is the shorter of repeated nearest neighbor and sorted edges', () => {
    for (const name of names) {
      const { matrix } = loadTsp(name);
      const best = solveTour(matrix, { method: 'best' }).length;
      const rnn = solveTour(matrix, { method: 'repeated-nearest-neighbor' }).length;
      const se = solveTour(matrix, { method: 'sorted-edges' }).length;
      expect(best).toBe(Math.min(rnn, se));
    }
  });
});

describe('solveTour edge cases', () => {
  it('returns the only circuit for trips of 1, 2 and 3 points, for every method', () => {
    const one = matrixFromRows([[0]]);
    const two = matrixFromRows([
      [0, 5],
      [5, 0],
    ]);
    const three = matrixFromRows([
      [0, 3, 4],
      [3, 0, 5],
      [4, 5, 0],
    ]);
    for (const method of [...heuristics, 'exact'] as TourMethod[]) {
      for (const improve of improvements) {
        expect(solveTour(one, { method, improve, timeLimitMs: 5, clock: steppingClock(0.01) })).toMatchObject({ order: [0], length: 0 });
        expect(solveTour(two, { method, improve, timeLimitMs: 5, depot: 1, clock: steppingClock(0.01) })).toMatchObject({ order: [1, 0], length: 10 });
        expect(solveTour(three, { method, improve, timeLimitMs: 5, depot: 2, clock: steppingClock(0.01) })).toMatchObject({ order: [2, 0, 1], length: 12 });
      }
    }
  });

  it('starts at a depot other than 0', () => {
    const m = randomEuclidean(30, 8);
    const r = solveTour(m, { method: 'best', improve: 'local', depot: 17 });
    expect(isCircuit(r.order, 30, 17)).toBe(true);
  });

  it('rejects an empty matrix, a bad depot and an unknown method', () => {
    const m = randomEuclidean(5, 1);
    expect(() => solveTour({ n: 0, d: new Float64Array(0) }, { method: 'best' })).toThrow(RangeError);
    expect(() => solveTour(m, { method: 'best', depot: 5 })).toThrow(/depot 5 is out of range/);
    expect(() => solveTour(m, { method: 'nope' as TourMethod })).toThrow(/unknown method/);
  });

  it('throws TimeLimitError when exact cannot finish in its budget', () => {
    const m = randomEuclidean(17, 2);
    // The table is checked every 1,024 subsets: 64 readings of 0.1 ms pass a 1 ms budget.
    expect(() => solveTour(m, { method: 'exact', timeLimitMs: 1, clock: steppingClock(0.1) })).toThrow(TimeLimitError);
  });

  it('deep is never longer than local from the same construction once its budget covers the first local optimum', () => {
    // A stepping clock makes the budget a fixed amount of work, independent of machine load.
    for (let seed = 1; seed <= 5; seed++) {
      const m = randomEuclidean(80, seed);
      const local = solveTour(m, { method: 'best', improve: 'local' }).length;
      const deep = solveTour(m, { method: 'best', improve: 'deep', timeLimitMs: 20, seed, clock: steppingClock(0.01) }).length;
      expect(deep).toBeLessThanOrEqual(local);
    }
  });

  it('deep finds the Held–Karp optimum on small trips', () => {
    // Held & Karp 1962 via heldKarp as the reference; at ≤ 12 points deep runs it directly, above by search.
    for (const n of [10, 14, 16]) {
      const m = randomEuclidean(n, 40 + n);
      const deep = solveTour(m, { method: 'nearest-neighbor', improve: 'deep', timeLimitMs: 50, clock: steppingClock(0.01) });
      expect(deep.length).toBeCloseTo(heldKarp(m).length, 9);
    }
  });

  it('from 200 points runs several searches, merges their circuits and still gives the same circuit for the same seed and work', () => {
    const m = randomEuclidean(260, 11);
    const run = (seed: number): SolveTourResult => solveTour(m, { method: 'best', improve: 'deep', timeLimitMs: 30, seed, clock: steppingClock(0.001) });
    const a = run(2);
    expect(isCircuit(a.order, 260)).toBe(true);
    expect(a.order).toEqual(run(2).order);
    expect(a.length).toBeLessThan(solveTour(m, { method: 'best', improve: 'local' }).length);
    // Four searches while the budget gives each point 0.5 ms, two below, one under 200 points.
    expect([streamsFor(199, 1000), streamsFor(439, 1000), streamsFor(1291, 1000), streamsFor(2392, 1000), streamsFor(2392, 5000)]).toEqual([1, 4, 4, 2, 4]);
  });

  it('gives the same circuit for the same seed and the same amount of work', () => {
    const m = randomEuclidean(100, 3);
    const run = (seed: number): number[] => solveTour(m, { method: 'best', improve: 'deep', timeLimitMs: 10, seed, clock: steppingClock(0.01) }).order;
    expect(run(5)).toEqual(run(5));
  });
});
