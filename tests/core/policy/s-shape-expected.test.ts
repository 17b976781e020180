import { describe, expect, it } from 'vitest';
import { blockLayoutOf } from '../../../server/core/policy/layout';
import { sShape } from '../../../server/core/policy/policies';
import { isNotApplicable } from '../../../server/core/policy/types';
import { createRng } from '../../../server/core/rng';
import { randomStops } from './helpers';

/**
 * Expected S-shape length in one block: n aisles w apart, length L, depot at the front of the first
 * aisle, m stops each in a uniformly chosen aisle at a uniform depth (random storage, as in the
 * expected-distance models of Hall 1993, IIE Transactions 25(4), and Roodbergen — from memory).
 *
 *   E[length] = 2w·E[R] + L·E[N] + L·E[ 1{N odd} · (K − 1)/(K + 1) ]
 *
 * - R = index (0-based) of the rightmost pick aisle: P(R ≤ k) = ((k + 1)/n)^m, so
 *   E[R] = Σ_{k=0}^{n−2} (1 − ((k + 1)/n)^m); the front and back cross aisles are walked 2w·R in all.
 * - N = number of pick aisles, E[N] = n·(1 − (1 − 1/n)^m): the standard occupancy result, the
 *   aisles-entered term of Hall's (1993) and Roodbergen's S-shape estimates (attribution from memory).
 * - Every pick aisle is walked end to end (L), except that with N odd the rightmost is entered and left
 *   from the front, 2·max of its K depths, E = 2L·K/(K + 1) (maximum of K uniforms); replacing L by
 *   that adds L(K − 1)/(K + 1), averaged over the exact law of (N, R, K):
 *   P(N = d + 1, R = r, K = c) = C(m, c) · C(r, d) · d! · S(m − c, d) / n^m, S = Stirling numbers of the
 *   second kind (the other m − c stops fill exactly d of the r aisles left of R).
 * The sum over (N, R, K) is derived here from the policy's definition, not recalled; the test also
 * checks that its probabilities add up to 1 and reproduce the occupancy E[N].
 */
function expectedSShape(n: number, w: number, L: number, m: number): { length: number; total: number; aisles: number } {
  const stirling: number[][] = Array.from({ length: m + 1 }, () => new Array<number>(m + 1).fill(0));
  stirling[0]![0] = 1;
  for (let t = 1; t <= m; t++) for (let d = 1; d <= t; d++) stirling[t]![d] = d * stirling[t - 1]![d]! + stirling[t - 1]![d - 1]!;
  const choose = (a: number, b: number): number => {
    let r = 1;
    for (let i = 1; i <= b; i++) r = (r * (a - b + i)) / i;
    return r;
  };
  let factorial = [1];
  for (let i = 1; i <= Math.max(n, m); i++) factorial = factorial.concat(factorial[i - 1]! * i);
  let total = 0;
  let aisles = 0;
  let correction = 0;
  for (let r = 0; r < n; r++) {
    for (let c = 1; c <= m; c++) {
      for (let d = 0; d <= Math.min(r, m - c); d++) {
        const p = (choose(m, c) * choose(r, d) * factorial[d]! * stirling[m - c]![d]!) / n ** m;
        total += p;
        aisles += p * (d + 1);
        if ((d + 1) % 2 === 1) correction += (p * (c - 1)) / (c + 1);
      }
    }
  }
  let eR = 0;
  for (let k = 0; k <= n - 2; k++) eR += 1 - ((k + 1) / n) ** m;
  const eN = n * (1 - (1 - 1 / n) ** m);
  return { length: 2 * w * eR + L * eN + L * correction, total, aisles };
}

describe('S-shape expected length in a single block', () => {
  it('the law of (N, R, K) used by the formula sums to 1 and gives the expected number of pick aisles', () => {
    for (const m of [1, 4, 12, 25]) {
      const f = expectedSShape(10, 3, 20, m);
      expect(f.total).toBeCloseTo(1, 10);
      // Occupancy (standard combinatorics): E[N] = n(1 − (1 − 1/n)^m).
      expect(f.aisles).toBeCloseTo(10 * (1 - 0.9 ** m), 10);
    }
  });

  it.each([1, 3, 8, 15, 30])('matches the formula within 3 standard errors for %i stops (20,000 trips)', (m) => {
    const n = 10;
    const w = 3;
    const L = 20;
    const layout = blockLayoutOf({ aisles: n, aisleSpacing: w, aisleLength: L, depotX: 0 });
    const rng = createRng(9300 + m);
    const trips = 20_000;
    let sum = 0;
    let sumSq = 0;
    for (let t = 0; t < trips; t++) {
      const r = sShape(layout, 0, randomStops(rng, layout, m));
      if (isNotApplicable(r)) throw new Error(r.reason);
      sum += r.length;
      sumSq += r.length * r.length;
    }
    const mean = sum / trips;
    const se = Math.sqrt((sumSq / trips - mean * mean) / (trips - 1));
    const expected = expectedSShape(n, w, L, m).length;
    expect(Math.abs(mean - expected)).toBeLessThan(3 * se);
  });
});
