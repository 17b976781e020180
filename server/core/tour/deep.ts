/**
 * Iterated local search: perturb the best circuit with a random double-bridge kick (a 4-opt move
 * 2-opt cannot undo; O. Martin, S. W. Otto & E. W. Felten, Complex Systems 5(3), 1991), re-optimise
 * around the kick with 2-opt / Or-opt, keep the result when it is no longer, until the budget ends.
 */
import type { DistanceMatrix } from '../matrix';
import type { Rng } from '../rng';
import type { Budget } from './budget';
import { TimeLimitError } from './budget';
import { heldKarp } from './exact';
import type { Neighbors } from './local';
import { createLocalSearch } from './local';

/** Up to this many points the exact method takes less time than one search pass is worth. */
export const DEEP_EXACT_MAX_POINTS = 12;

/**
 * Improves a circuit until `budget` expires. It first takes `order` to its 2-opt / Or-opt local
 * optimum, so when the budget covers that step the result is never longer than `local`'s. Trips of ≤ 12 points are solved exactly by Held–Karp (a few milliseconds)
 * when the budget allows. Needs a finite budget; each iteration costs about O(n) plus a local repair.
 * Returns the circuit from an arbitrary point (the caller rotates it to the depot).
 */
export function improveDeep(
  m: DistanceMatrix,
  order: ArrayLike<number>,
  budget: Budget,
  rng: Rng,
  neighbors?: Neighbors,
): number[] {
  const n = m.n;
  if (budget.deadline === Infinity) throw new RangeError('deep improvement needs a finite timeLimitMs');
  if (n < 4) return Array.from(order);
  if (n <= DEEP_EXACT_MAX_POINTS) {
    try {
      return heldKarp(m, order[0]!, { timeLimitMs: Math.max(0, budget.deadline - budget.clock()), clock: budget.clock }).order;
    } catch (e) {
      if (!(e instanceof TimeLimitError)) throw e;
    }
  }
  const ls = createLocalSearch(m, undefined, neighbors);
  ls.load(order);
  ls.run(budget, true);
  const best = Int32Array.from(ls.tour);
  let bestLen = ls.length();
  if (n < 8) return Array.from(best);

  const kicked = new Int32Array(n);
  const ends = new Int32Array(8);
  const cut = new Int32Array(3);
  while (!budget.expired()) {
    // Three distinct cuts in 1..n−1 split the circuit into A B C D; the kick reconnects A C B D.
    cut[0] = 1 + rng.int(n - 1);
    do cut[1] = 1 + rng.int(n - 1);
    while (cut[1] === cut[0]);
    do cut[2] = 1 + rng.int(n - 1);
    while (cut[2] === cut[0] || cut[2] === cut[1]);
    cut.sort();
    const [p1, p2, p3] = [cut[0]!, cut[1]!, cut[2]!];
    let w = 0;
    for (let i = 0; i < p1; i++) kicked[w++] = best[i]!;
    for (let i = p2; i < p3; i++) kicked[w++] = best[i]!;
    for (let i = p1; i < p2; i++) kicked[w++] = best[i]!;
    for (let i = p3; i < n; i++) kicked[w++] = best[i]!;
    ends[0] = best[p1 - 1]!;
    ends[1] = best[p1]!;
    ends[2] = best[p2 - 1]!;
    ends[3] = best[p2]!;
    ends[4] = best[p3 - 1]!;
    ends[5] = best[p3]!;
    ends[6] = best[n - 1]!;
    ends[7] = best[0]!;
    ls.load(kicked, ends);
    ls.run(budget, false);
    const len = ls.length();
    // Accepting equal lengths lets the search drift across plateaus instead of re-kicking one circuit.
    if (len <= bestLen) {
      best.set(ls.tour);
      bestLen = len;
    }
  }
  return Array.from(best);
}
