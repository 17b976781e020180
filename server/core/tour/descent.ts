import type { DistanceMatrix } from '../matrix';
import { bestDoubleBridge } from './bridge';
import { neighboursOf } from './circuit';
import type { Budget } from './budget';
import { createKOptSearch } from './kopt';
import { comparisonOf, createLocalSearch, gainEpsilon, improveLocal } from './local';
import type { LocalMoves, Neighbors } from './local';

/**
 * k of the k-opt step in `descend` (3, 4, 5 measured on TSPLIB instances of 200–1,291 points, 1 s:
 * 1.23, 1.00, 1.06 % above the optima on average; 4 is the cheaper of the two best).
 */
export const DESCENT_K = 4;

/** Below this many points `descend` is `improveLocal` alone (a double bridge needs four segments of two). */
export const DESCENT_MIN_POINTS = 8;

/**
 * Above this many points `descend` adds the k-opt search. Trips up to it already get the or-3opt chain
 * at every level (OR3_SMALL_TRIP_MAX_POINTS in ./local.ts), and the k-opt pass would cost the
 * benchmark's 1,000 trips of 30 stops about a third more time for 0.09 % less walking.
 */
export const DESCENT_KOPT_FROM = 150;

/**
 * `local`'s descent: improves `order` until no move of these neighbourhoods shortens it, each search
 * starting where the last one stopped:
 * 1. 2-opt, Or-opt and Lin–Kernighan-style chains (`createLocalSearch`, ./local.ts), with its closing
 *    scan of every 2-opt and Or-opt move up to FULL_SCAN_MAX_POINTS;
 * 2. above DESCENT_KOPT_FROM points, sequential k-opt moves, k = DESCENT_K, chained (./kopt.ts);
 * 3. the shortening double bridge (./bridge.ts), the one 4-opt move no sequential chain makes.
 * 2 and 3 alternate until neither finds anything, then 1 looks again at the points whose edges changed.
 * No kicks and no randomness: the same trip always gives the same circuit, and a trip whose local
 * optimum comes early returns early. When `budget` expires the circuit reached so far is returned (never
 * longer than `order`). Returns the circuit in tour order from an arbitrary point.
 *
 * Measured (one run, CPU clock, 1 s, against the TSPLIB optima, Reinelt 1991): d1291 3.54 % after 1
 * alone, 2.92 % after all three; pr1002 2.25 → 1.36 %; pr2392 2.17 → 1.33 %; each in under 0.9 s.
 */
export function descend(m: DistanceMatrix, order: ArrayLike<number>, budget: Budget | undefined, moves: LocalMoves, neighbors: Neighbors): number[] {
  const n = m.n;
  if (n < DESCENT_MIN_POINTS) return improveLocal(m, order, budget, moves, neighbors);
  const dist = comparisonOf(m, neighbors.pi);
  const eps = gainEpsilon(m, neighbors);
  const ls = createLocalSearch(m, moves, neighbors);
  ls.load(order);
  if (n <= DESCENT_KOPT_FROM) {
    for (;;) {
      if (!ls.run(budget, true)) return Array.from(ls.tour);
      const bridge = bestDoubleBridge(ls.tour, dist, neighbors, eps, budget);
      if (!bridge) return Array.from(ls.tour);
      ls.doubleBridge(bridge.at, bridge.l1, bridge.l2, bridge.l3);
    }
  }
  if (!ls.run(budget, false)) return Array.from(ls.tour);
  const ks = createKOptSearch(m, neighbors, { k: DESCENT_K });
  ks.load(ls.tour);
  for (;;) {
    if (!ks.run(budget, false)) return Array.from(ks.tour);
    const bridge = bestDoubleBridge(ks.tour, dist, neighbors, eps, budget);
    if (bridge) {
      ks.doubleBridge(bridge.at, bridge.l1, bridge.l2, bridge.l3);
      continue;
    }
    // Back to the first search, for the points whose edges changed since it last stopped.
    const before = Int32Array.from(ks.tour);
    const length = ks.length();
    ls.load(before, pointsWithNewEdges(ls.tour, before));
    if (!ls.run(budget, false)) return Array.from(ls.tour);
    if (!(ls.length() < length - eps) && (!ls.run(budget, true) || !(ls.length() < length - eps))) return Array.from(ls.tour);
    ks.load(ls.tour, pointsWithNewEdges(before, ls.tour));
  }
}

/** The points whose two circuit neighbours differ between two circuits of the same points. O(n). */
export function pointsWithNewEdges(before: Int32Array, after: Int32Array): number[] {
  const n = before.length;
  const was = neighboursOf(before, n);
  const now = neighboursOf(after, n);
  const out: number[] = [];
  // In `after`'s order: the search queues them in this order.
  for (let i = 0; i < n; i++) {
    const c = after[i]!;
    const x = was[2 * c]!;
    const y = was[2 * c + 1]!;
    const a = now[2 * c]!;
    const b = now[2 * c + 1]!;
    if (!((a === x && b === y) || (a === y && b === x))) out.push(c);
  }
  return out;
}
