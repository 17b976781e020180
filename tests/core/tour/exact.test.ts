import { describe, expect, it } from 'vitest';
import { circuitLength, matrixFromRows } from '../../../server/core/matrix';
import { heldKarp } from '../../../server/core/tour/exact';
import { TimeLimitError } from '../../../server/core/tour/budget';
import { bruteForce } from '../../helpers/bruteForce';
import { isCircuit, randomEuclidean, randomIntegerMatrix } from '../../helpers/instances';
import { loadTsp, TSPLIB_OPTIMA } from '../../helpers/tsplib';

describe('heldKarp', () => {
  // Published optima, TSPLIB (Reinelt 1991), GEO distance as in the README of reference/tsplib.
  it.each(['burma14', 'ulysses16'])('finds the published optimum of %s', (name) => {
    const { matrix } = loadTsp(name);
    const r = heldKarp(matrix);
    expect(isCircuit(r.order, matrix.n)).toBe(true);
    expect(r.length).toBe(TSPLIB_OPTIMA[name]);
    expect(circuitLength(matrix, r.order)).toBe(r.length);
  });

  it('starts the circuit at a depot other than point 0 and keeps the optimum', () => {
    const { matrix } = loadTsp('burma14');
    const r = heldKarp(matrix, 5);
    expect(isCircuit(r.order, matrix.n, 5)).toBe(true);
    // TSPLIB optimum of burma14 (Reinelt 1991): independent of where the circuit starts.
    expect(r.length).toBe(3323);
  });

  // Oracle: exhaustive enumeration of all (n − 1)!/2 circuits (standard combinatorics).
  it('agrees with brute force on random matrices up to n = 9', () => {
    for (let n = 1; n <= 9; n++) {
      for (let seed = 1; seed <= 4; seed++) {
        const m = seed % 2 === 0 ? randomEuclidean(n, seed * 31 + n) : randomIntegerMatrix(n, seed * 17 + n);
        const depot = seed % n;
        const exact = heldKarp(m, depot);
        const oracle = bruteForce(m, depot);
        expect(isCircuit(exact.order, n, depot)).toBe(true);
        expect(exact.length).toBeCloseTo(oracle.length, 9);
      }
    }
  });

  it('handles trips of 1, 2 and 3 points', () => {
    expect(heldKarp(matrixFromRows([[0]]))).toEqual({ order: [0], length: 0 });
    expect(
      heldKarp(
        matrixFromRows([
          [0, 4],
          [4, 0],
        ]),
      ),
    ).toEqual({ order: [0, 1], length: 8 });
    const three = heldKarp(
      matrixFromRows([
        [0, 3, 4],
        [3, 0, 5],
        [4, 5, 0],
      ]),
      2,
    );
    expect(three).toEqual({ order: [2, 0, 1], length: 12 });
  });

  it('refuses more than 16 stops with a RangeError naming the limit', () => {
    const m = randomEuclidean(18, 3);
    expect(() => heldKarp(m)).toThrow(RangeError);
    expect(() => heldKarp(m)).toThrow(/16 stops/);
    expect(() => heldKarp(randomEuclidean(17, 3))).not.toThrow();
  });

  it('refuses a depot out of range and an empty matrix', () => {
    expect(() => heldKarp(randomEuclidean(4, 1), 4)).toThrow(/depot 4 is out of range/);
    expect(() => heldKarp({ n: 0, d: new Float64Array(0) })).toThrow(RangeError);
  });

  it('throws TimeLimitError when its budget runs out before the table is full', () => {
    let t = 0;
    const clock = (): number => (t += 1);
    expect(() => heldKarp(randomEuclidean(17, 9), 0, { timeLimitMs: 5, clock })).toThrow(TimeLimitError);
  });
});

describe('bruteForce oracle', () => {
  // (n − 1)!/2 distinct circuits of the complete graph K_n: 60 for n = 6 (standard combinatorics).
  it('counts (n − 1)!/2 circuits', () => {
    expect(bruteForce(randomEuclidean(6, 1)).count).toBe(60);
    expect(bruteForce(randomEuclidean(7, 1)).count).toBe(360);
    expect(bruteForce(randomEuclidean(3, 1)).count).toBe(1);
  });
});
