import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { DistanceMatrix } from '../../../server/core/matrix';
import { circuitLength, matrixFromFunction } from '../../../server/core/matrix';
import type { ImproveMode, TourMethod } from '../../../server/core/tour/index';
import { heldKarp, heldKarpBound, solveTour } from '../../../server/core/tour/index';
import { steppingClock } from '../../helpers/clock';
import { isCircuit } from '../../helpers/instances';
import { bestOrOptGain, bestTwoOptGain } from '../../helpers/moves';

/** Symmetric, non-negative, zero-diagonal matrices; integer or fractional; no triangle inequality. */
const matrixArb = (maxN: number): fc.Arbitrary<DistanceMatrix> =>
  fc.integer({ min: 1, max: maxN }).chain((n) =>
    fc
      .array(fc.oneof(fc.integer({ min: 0, max: 1000 }), fc.double({ min: 0, max: 1000, noNaN: true })), {
        minLength: (n * (n - 1)) / 2,
        maxLength: (n * (n - 1)) / 2,
      })
      .map((vals) => {
        let k = 0;
        const upper = new Float64Array(n * n);
        for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) upper[i * n + j] = vals[k++]!;
        return matrixFromFunction(n, (i, j) => upper[i * n + j]!);
      }),
  );

const methodArb = fc.constantFrom<TourMethod>('nearest-neighbor', 'repeated-nearest-neighbor', 'sorted-edges', 'exact', 'best');
const improveArb = fc.constantFrom<ImproveMode>('none', 'local', 'deep');

describe('solveTour properties (fast-check)', () => {
  it('returns a permutation starting at the depot whose length is recomputed exactly', () => {
    fc.assert(
      fc.property(matrixArb(16), methodArb, improveArb, fc.nat(), (m, method, improve, depotSeed) => {
        const depot = depotSeed % m.n;
        const r = solveTour(m, { method, improve, depot, timeLimitMs: 2, clock: steppingClock(0.01) });
        expect(isCircuit(r.order, m.n, depot)).toBe(true);
        expect(r.length).toBe(circuitLength(m, r.order));
      }),
      { numRuns: 150, seed: 20260 },
    );
  });

  it('gives identical results for the same seed and the same amount of work', () => {
    fc.assert(
      fc.property(matrixArb(30), methodArb, improveArb, fc.integer(), (m, method, improve, seed) => {
        if (method === 'exact' && m.n > 17) return;
        const run = () => solveTour(m, { method, improve, seed, timeLimitMs: 2, clock: steppingClock(0.01) });
        const a = run();
        const b = run();
        expect(b.order).toEqual(a.order);
        expect(b.length).toBe(a.length);
      }),
      { numRuns: 80, seed: 20261 },
    );
  });

  it('no heuristic beats Held–Karp and the bound never exceeds it', () => {
    // Held & Karp 1962 (exact) and 1970 (bound): lower bound ≤ optimum ≤ any circuit.
    fc.assert(
      fc.property(matrixArb(10), methodArb, improveArb, (m, method, improve) => {
        const opt = heldKarp(m).length;
        const r = solveTour(m, { method, improve, timeLimitMs: 2, clock: steppingClock(0.01) });
        const tol = 1e-9 * Math.max(1, opt);
        expect(r.length).toBeGreaterThanOrEqual(opt - tol);
        // From above: exact is the optimum itself, and improving never lengthens it.
        if (method === 'exact') expect(r.length).toBeLessThanOrEqual(opt + tol);
        expect(heldKarpBound(m, { timeLimitMs: 20, clock: steppingClock(0.01) }).lowerBound).toBeLessThanOrEqual(opt + tol);
      }),
      { numRuns: 150, seed: 20262 },
    );
  });

  it('local leaves no improving 2-opt or Or-opt move on any matrix, metric or not', () => {
    // Definitions of 2-opt (Croes 1958) and Or-opt (Or 1976), checked by exhaustive enumeration.
    fc.assert(
      fc.property(matrixArb(14), fc.constantFrom<TourMethod>('nearest-neighbor', 'sorted-edges', 'best'), (m, method) => {
        const r = solveTour(m, { method, improve: 'local' });
        const maxD = m.d.reduce((a, b) => Math.max(a, b), 0);
        const tol = 2e-9 * Math.max(1, maxD);
        expect(bestTwoOptGain(m, r.order)).toBeLessThanOrEqual(tol);
        expect(bestOrOptGain(m, r.order)).toBeLessThanOrEqual(tol);
      }),
      { numRuns: 200, seed: 20263 },
    );
  });
});
