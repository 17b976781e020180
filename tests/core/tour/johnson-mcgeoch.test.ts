import { beforeAll, describe, expect, it } from 'vitest';
import { heldKarpBound, solveTour } from '../../../server/core/tour/index';
import { steppingClock } from '../../helpers/clock';
import { randomEuclidean } from '../../helpers/instances';

// D. S. Johnson & L. A. McGeoch, "The traveling salesman problem: a case study in local optimization",
// in Local Search in Combinatorial Optimization (Aarts & Lenstra, eds.), Wiley 1997: on random uniform
// points, nearest neighbor averages about 25 % over the Held–Karp bound and greedy (sorted edges)
// about 16–19 % (values from memory of that study; tolerance of a few points either side).
describe('excess over the Held–Karp bound on random uniform points (n = 100)', () => {
  const seeds = Array.from({ length: 20 }, (_, i) => 1000 + i);
  const excess = { nn: [] as number[], se: [] as number[] };
  beforeAll(() => {
    for (const seed of seeds) {
      const m = randomEuclidean(100, seed);
      const lb = heldKarpBound(m, { timeLimitMs: 2000, clock: steppingClock(0.01) }).lowerBound;
      excess.nn.push(solveTour(m, { method: 'nearest-neighbor' }).length / lb - 1);
      excess.se.push(solveTour(m, { method: 'sorted-edges' }).length / lb - 1);
    }
    // Twenty bounds at n = 100 take about a second; allow for a busy shared machine.
  }, 60_000);
  const mean = (v: number[]): number => (100 * v.reduce((a, b) => a + b, 0)) / v.length;

  it('nearest neighbor is about 25 % above the bound', () => {
    expect(mean(excess.nn)).toBeGreaterThan(21);
    expect(mean(excess.nn)).toBeLessThan(29);
  });

  it('sorted edges is about 16–19 % above the bound', () => {
    expect(mean(excess.se)).toBeGreaterThan(13);
    expect(mean(excess.se)).toBeLessThan(22);
  });

  it('sorted edges beats nearest neighbor on average, as in the study', () => {
    expect(mean(excess.se)).toBeLessThan(mean(excess.nn));
  });
});
