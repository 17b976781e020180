/**
 * Exact shortest closed circuit by dynamic programming over subsets (M. Held & R. M. Karp, "A dynamic
 * programming approach to sequencing problems", J. SIAM 10(1):196–210, 1962).
 */
import type { DistanceMatrix } from '../matrix';
import { circuitLength } from '../matrix';
import type { BudgetOptions } from './budget';
import { budgetOf, TimeLimitError } from './budget';
import { canonicalize } from './circuit';

/** Largest number of points (depot included) Held–Karp accepts: 16 stops. */
export const HELD_KARP_MAX_POINTS = 17;

export interface TourResult {
  /** Point indices, depot first, each index once. */
  order: number[];
  /** Circuit length in metres, including the walk back to the depot. */
  length: number;
}

/**
 * The shortest closed circuit through all `m.n` points, starting at `depot`.
 *
 * Time O(2ⁿ·n²), memory O(2ⁿ·n): at n = 17, 2¹⁶·16 doubles (8.4 MB) of lengths plus 1 MB of
 * predecessors, a few tens of milliseconds. Ties go to the lowest point index; the circuit is
 * returned in the direction whose first stop is lower than its last (`canonicalize`).
 * n = 1 gives `[depot]` with length 0; n = 2 gives the out-and-back.
 *
 * @throws RangeError when n = 0, n > 17 (more than 16 stops) or the depot is out of range.
 * @throws TimeLimitError when `opts.timeLimitMs` runs out first (there is no partial answer).
 */
export function heldKarp(m: DistanceMatrix, depot = 0, opts: BudgetOptions = {}): TourResult {
  const n = m.n;
  if (n === 0) throw new RangeError('Held–Karp needs at least one point (the depot)');
  if (n > HELD_KARP_MAX_POINTS) {
    throw new RangeError(`Held–Karp is limited to ${HELD_KARP_MAX_POINTS - 1} stops plus the depot; this trip has ${n - 1} stops`);
  }
  if (!Number.isInteger(depot) || depot < 0 || depot >= n) {
    throw new RangeError(`depot ${depot} is out of range 0..${n - 1}`);
  }
  if (n === 1) return { order: [depot], length: 0 };
  const budget = budgetOf(opts);
  const d = m.d;

  // Stops are renumbered 0..k-1 in increasing point order so subset bit j means stop pts[j].
  const k = n - 1;
  const pts = new Int32Array(k);
  for (let i = 0, j = 0; i < n; i++) if (i !== depot) pts[j++] = i;
  // Local k×k matrix and depot row keep the hot loop on a small, contiguous array.
  const dd = new Float64Array(k * k);
  const d0 = new Float64Array(k);
  for (let a = 0; a < k; a++) {
    d0[a] = d[depot * n + pts[a]!]!;
    for (let b = 0; b < k; b++) dd[a * k + b] = d[pts[a]! * n + pts[b]!]!;
  }

  const full = (1 << k) - 1;
  // best[mask*k + j]: shortest path from the depot through exactly `mask`, ending at stop j ∈ mask.
  const best = new Float64Array((full + 1) * k);
  const prev = new Uint8Array((full + 1) * k);
  for (let j = 0; j < k; j++) best[(1 << j) * k + j] = d0[j]!;

  // Increasing masks visit every subset before its supersets.
  for (let mask = 1; mask <= full; mask++) {
    if ((mask & 1023) === 0 && budget.expired()) {
      throw new TimeLimitError(`Held–Karp did not finish within ${opts.timeLimitMs} ms`);
    }
    if ((mask & (mask - 1)) === 0) continue;
    const row = mask * k;
    for (let j = 0; j < k; j++) {
      if ((mask & (1 << j)) === 0) continue;
      const from = (mask ^ (1 << j)) * k;
      let bestLen = Infinity;
      let bestK = 0;
      for (let i = 0; i < k; i++) {
        if (i === j || (mask & (1 << i)) === 0) continue;
        const len = best[from + i]! + dd[i * k + j]!;
        if (len < bestLen) {
          bestLen = len;
          bestK = i;
        }
      }
      best[row + j] = bestLen;
      prev[row + j] = bestK;
    }
  }

  let bestTotal = Infinity;
  let last = 0;
  for (let j = 0; j < k; j++) {
    const len = best[full * k + j]! + d0[j]!;
    if (len < bestTotal) {
      bestTotal = len;
      last = j;
    }
  }

  const rev: number[] = [];
  let mask = full;
  let j = last;
  while (mask !== 0) {
    rev.push(pts[j]!);
    const p = prev[mask * k + j]!;
    mask ^= 1 << j;
    j = p;
  }
  rev.push(depot);
  rev.reverse();
  canonicalize(rev, depot);
  // Recomputed in circuit order so every method reports lengths summed the same way.
  return { order: rev, length: circuitLength(m, rev) };
}
