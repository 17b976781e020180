import { describe, expect, it } from 'vitest';
import { createRng } from '../../../server/core/rng';
import { closedWalkMetres, remainingMetres, resequenceFree } from '../../../server/picking/route-math';

/** Shortest open walk from `from` through every free point to `to`, by trying every order (k! paths). */
function bruteForcePath(k: number, d: (a: number, b: number) => number, from: number, to: number): number {
  let best = Infinity;
  const used = new Array<boolean>(k).fill(false);
  const visit = (at: number, depth: number, len: number) => {
    if (len >= best) return;
    if (depth === k) {
      best = Math.min(best, len + d(at, to));
      return;
    }
    for (let i = 0; i < k; i++) {
      if (used[i]) continue;
      used[i] = true;
      visit(i, depth + 1, len + d(at, i));
      used[i] = false;
    }
  };
  visit(from, 0, 0);
  return best;
}

describe('resequenceFree', () => {
  it('finds the shortest open walk between fixed ends on random Manhattan points (checked by enumeration)', () => {
    const rng = createRng(7);
    let optimal = 0;
    const trials = 40;
    for (let trial = 0; trial < trials; trial++) {
      const k = 3 + (trial % 5);
      // Free points 0..k-1, from = k, to = k + 1.
      const pts = Array.from({ length: k + 2 }, () => [rng.next() * 50, rng.next() * 30] as const);
      const d = (a: number, b: number) => Math.abs(pts[a]![0] - pts[b]![0]) + Math.abs(pts[a]![1] - pts[b]![1]);
      const free = Array.from({ length: k }, (_, i) => i);
      const order = resequenceFree(free, k, k + 1, d);
      expect([...order].sort((a, b) => a - b)).toEqual(free);
      let len = 0;
      let at = k;
      for (const i of order) {
        len += d(at, free[i]!);
        at = free[i]!;
      }
      len += d(at, k + 1);
      const best = bruteForcePath(k, d, k, k + 1);
      expect(len).toBeGreaterThanOrEqual(best - 1e-9);
      if (len <= best + 1e-9) optimal++;
    }
    // 2-opt + Or-opt on ≤ 7 points reaches the optimum in nearly every case (local search, not exact).
    expect(optimal).toBeGreaterThanOrEqual(trials - 2);
  });

  it('returns the only order for one free stop and nothing for none', () => {
    const d = (a: number, b: number) => Math.abs(a - b);
    expect(resequenceFree([5], 0, 9, d)).toEqual([0]);
    expect(resequenceFree([], 0, 9, d)).toEqual([]);
  });

  it('walks points on a line in order from one end to the other', () => {
    const d = (a: number, b: number) => Math.abs(a - b);
    expect(resequenceFree([40, 10, 30, 20], 0, 50, d)).toEqual([1, 3, 2, 0]);
  });
});

describe('walk lengths', () => {
  it('sums depot → stops → depot, and the rest of a walk from where the picker stands', () => {
    const d = (a: number, b: number) => Math.abs(a - b);
    expect(closedWalkMetres(0, [10, 5, 20], d)).toBe(10 + 5 + 15 + 20);
    expect(closedWalkMetres(0, [], d)).toBe(0);
    expect(remainingMetres(5, [20], 0, d)).toBe(15 + 20);
    expect(remainingMetres(7, [], 0, d)).toBe(7);
  });
});
