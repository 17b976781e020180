import { describe, expect, it } from 'vitest';
import { circuitLength, matrixFromRows } from '../../../server/core/matrix';
import { nearestNeighbor, repeatedNearestNeighbor, sortedEdges } from '../../../server/core/tour/construct';
import { neighborLists } from '../../../server/core/tour/local';
import { isCircuit, randomEuclidean, randomIntegerMatrix } from '../../helpers/instances';
import { loadTsp, TSPLIB_OPTIMA } from '../../helpers/tsplib';

const names = Object.keys(TSPLIB_OPTIMA);

describe('constructions on TSPLIB', () => {
  // Published optima (TSPLIB README table, Reinelt 1991): no valid circuit can be shorter.
  // From above: nearest neighbor is at most (⌈log2 n⌉ + 1)/2 times the optimum on metric instances
  // (Rosenkrantz, Stearns & Lewis 1977), greedy / sorted edges likewise (Ong & Moore 1984; bound from memory).
  it.each(names)('%s: every construction gives a valid circuit between the optimum and the worst-case bound', (name) => {
    const { matrix } = loadTsp(name);
    const opt = TSPLIB_OPTIMA[name]!;
    const worstCase = ((Math.ceil(Math.log2(matrix.n)) + 1) / 2) * opt;
    for (const order of [nearestNeighbor(matrix, 0), repeatedNearestNeighbor(matrix, 0), sortedEdges(matrix, 0)]) {
      expect(isCircuit(order, matrix.n, 0)).toBe(true);
      expect(circuitLength(matrix, order)).toBeGreaterThanOrEqual(opt);
      expect(circuitLength(matrix, order)).toBeLessThanOrEqual(worstCase);
    }
  });
});

describe('nearest neighbor with neighbour lists', () => {
  it('walks exactly the same order as the full row scan, ties included', () => {
    // Integer entries in 1..5 make ties everywhere: the lists must keep the lowest-index rule.
    for (let seed = 1; seed <= 20; seed++) {
      const m = seed % 2 ? randomIntegerMatrix(40, seed, 5) : randomEuclidean(40, seed);
      const lists = neighborLists(m, 1 + (seed % 10));
      for (const start of [0, 13, 39]) expect(nearestNeighbor(m, start, lists)).toEqual(nearestNeighbor(m, start));
    }
  });
});

describe('repeated nearest neighbor', () => {
  // Follows from the definition: the depot's own run is one of the candidates (common practice).
  it('is never longer than nearest neighbor from the depot', () => {
    for (let seed = 1; seed <= 30; seed++) {
      const m = seed % 2 ? randomEuclidean(25, seed) : randomIntegerMatrix(25, seed);
      const depot = seed % 25;
      const rnn = circuitLength(m, repeatedNearestNeighbor(m, depot));
      const nn = circuitLength(m, nearestNeighbor(m, depot));
      expect(rnn).toBeLessThanOrEqual(nn);
    }
  });

  it('returns the circuit rotated to begin at the depot', () => {
    const m = randomEuclidean(12, 4);
    const order = repeatedNearestNeighbor(m, 7);
    expect(isCircuit(order, 12, 7)).toBe(true);
  });
});

describe('tie rule: lowest index wins', () => {
  // Four corners of a unit square: from 0, points 1 and 3 are both at 1; the lower index is taken.
  const square = matrixFromRows([
    [0, 1, Math.SQRT2, 1],
    [1, 0, 1, Math.SQRT2],
    [Math.SQRT2, 1, 0, 1],
    [1, Math.SQRT2, 1, 0],
  ]);
  it('nearest neighbor steps to the lower-numbered of two equally near points', () => {
    expect(nearestNeighbor(square, 0)).toEqual([0, 1, 2, 3]);
    expect(nearestNeighbor(square, 2)).toEqual([2, 1, 0, 3]);
  });

  it('sorted edges takes equal edges in (lower end, higher end) order', () => {
    // Edges of length 1: (0,1), (0,3), (1,2), (2,3). Taken in that order, (2,3) would close early;
    // three are taken and the path 3–0–1–2 is closed by (2,3).
    expect(sortedEdges(square, 0)).toEqual([0, 1, 2, 3]);
  });
});

describe('sorted edges', () => {
  it('builds the cheapest-edge circuit on a line of points', () => {
    // Points on a line at 0, 1, 3, 6: greedy takes (0,1), (1,2), (2,3), then closes (3,0): 12 = 2 × span.
    const x = [0, 1, 3, 6];
    const m = matrixFromRows(x.map((a) => x.map((b) => Math.abs(a - b))));
    const order = sortedEdges(m, 2);
    expect(isCircuit(order, 4, 2)).toBe(true);
    expect(circuitLength(m, order)).toBe(12);
  });

  it('gives a valid circuit on non-metric matrices of every small size', () => {
    for (let n = 1; n <= 12; n++) {
      const m = randomIntegerMatrix(n, 100 + n);
      expect(isCircuit(sortedEdges(m, n - 1), n, n - 1)).toBe(true);
    }
  });
});
