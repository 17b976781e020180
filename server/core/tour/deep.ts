/**
 * Iterated local search (O. Martin, S. W. Otto & E. W. Felten, Complex Systems 5(3), 1991; H. R.
 * Lourenço, O. C. Martin & T. Stützle, Iterated Local Search, Handbook of Metaheuristics 2003): take the
 * circuit to a local optimum of the Lin–Kernighan search with sequential 3-opt steps (./kopt.ts), then until
 * the budget ends kick it with a local double bridge — three neighbouring segments of the circuit put
 * in reverse order, each the same way round, a 4-opt move the sequential moves cannot undo (half the
 * kicks: three short segments of ≤ 30 points after a random point v; the other half: the first two
 * segments fill the path from v to one of its candidates w, so (v, w) becomes an edge) —
 * repair only around the kick, and keep the
 * result when it is no longer than the best circuit met plus a small threshold (ACCEPT_SLACK of the mean
 * edge: a record-to-record rule, G. Dueck, Journal of Computational Physics 104(1), 1993), so the search
 * walks across near-equal circuits instead of re-kicking one; the best circuit met is returned. Kicks are
 * applied in place and recorded in an undo log, so a rejected kick costs what it changed, not a copy of
 * the circuit (the best is copied only when a kick improves on it). From STREAMS_MIN_POINTS points
 * several such searches run one after another — the first from the given circuit's local optimum, each
 * other from its own nearest-neighbor circuit (a random first point) — and their circuits are merged by
 * partition crossover (./merge.ts; D. Whitley, D. Hains & A. Howe, GECCO 2009), and the last part of the
 * budget searches on from the merged circuit.
 */
import type { DistanceMatrix } from '../matrix';
import { circuitLength } from '../matrix';
import type { Rng } from '../rng';
import type { Budget } from './budget';
import { budgetUntil, TimeLimitError } from './budget';
import { nearestNeighbor } from './construct';
import { heldKarp } from './exact';
import type { LocalSearch, Neighbors } from './local';
import { neighborLists, neighborsFor } from './local';
import { createKOptSearch } from './kopt';
import { mergeCircuits } from './merge';

/** Up to this many points the exact method takes less time than one search pass is worth. */
export const DEEP_EXACT_MAX_POINTS = 12;
/** Longest kicked segment, points: short segments keep each kick and its repair local. */
const KICK_SEGMENT_MAX = 30;
/**
 * Kicks leaving the circuit at most this fraction of the mean edge above the best met are kept. Tuned
 * on TSPLIB 200–1,291 points at 1 s (0, 0.1, 0.3, 0.5 and 1 tried; 0.3 best on average); checked again
 * with the double bridges and α-nearness lists (318–1,291 points, seeds 1–3: 0.1 and 0.6 no better).
 */
const ACCEPT_SLACK = 0.3;
/**
 * Up to this many points the first descent repeats its passes over every point until one finds
 * nothing; above it the kicks start once the queue of points to look at is empty.
 */
const DEEP_FULL_SCAN_MAX_POINTS = 300;
/**
 * From this many points the budget after the first descent goes to several searches (the first from that
 * local optimum, see below for the others), each with its own kicks, whose circuits are merged by partition crossover
 * (./merge.ts); the last TAIL_SHARE of the budget continues from the child. One search ends in one of a
 * few traps by chance, early, and stays there (TSPLIB pr439 at 1 s: 0.04 % or 0.85 % above the optimum
 * by seed, 8 of 15 seeds trapped, the same at 5 s); independent searches rarely all fall into one, and
 * the child takes the better parts of each. Measured at 1 s CPU with the 2-opt-chain search of ./local.ts on lin318, pr439 (seeds 1–15), rat575,
 * u724 (seeds 1–4), mean % above the optimum with kroA200 (0): one search 0.243, two 0.149, three
 * 0.144, four 0.107–0.131, six 0.133, eight 0.126; a shared first stretch before the searches split
 * (20–30 % of the budget) was worse (0.207–0.320): the traps are met in that stretch.
 */
export const STREAMS_MIN_POINTS = 200;
/*
 * Each search after the first starts from its own circuit. Searches from one local optimum share its
 * large-scale choices, which no local kick undoes: on TSPLIB d1291 (a drilling board of double rows)
 * the first local optimum often crosses from the bottom row to the next block by a 791-unit edge that
 * costs ≈ 1.5 %, and every search kept it. Measured (CPU clock, against the TSPLIB optima; all
 * searches from one local optimum → the others from nearest-neighbor circuits from random points):
 * d1291 at 1 s, seeds 1–20, 1.25 → 0.36 % in one run (worst seed 2.61 → 1.03 %), 0.86 → 0.63 % in
 * another (this commit's code against the one before); at 5 s, seeds 1–4, 0.57 → 0.17 %;
 * pr2392 at 5 s 0.41 → 0.30 %; lin318, pr439, rat575, u724 and rat783 at 1 s (seeds 1–6) 0.063 → 0.032 %;
 * pr1002 0.27 → 0.26 % (1 s) and 0.04 → 0.04 % (5 s); pr2392 at 1 s 0.67 → 0.73 % (two searches).
 * Randomly perturbed sorted-edges circuits gave less (d1291 1 s: 0.67 %).
 */
/** Searches when the budget is short for the size (above 2,000 points at 1 s). */
export const DEEP_STREAMS = 2;
/**
 * Searches when the budget is ample for the size. With the k-opt search, at 1 s CPU (seeds 1–4, same
 * runs): pr1002 two 0.24 %, four 0.22 %, six 0.19 %, eight 0.28 %; d1291 1.18, 1.19, 0.73, 0.55 % (its
 * seeds split between ≈ 0.3 % and ≈ 2.5 %); lin318, pr439, rat575, u724 and kroA200 four 0.046 %,
 * six 0.078 %, eight 0.051 %.
 */
export const MANY_STREAMS = 4;
/**
 * Budget per point (ms), as `improveDeep` receives it, from which MANY_STREAMS run: at 1 s up to about
 * 1,400 points with α-nearness lists (their steps and values take a quarter of the budget first) and
 * about 1,900 without. d1291 at 1 s (0.7 ms per point when the improvement starts), seeds 1–20: four searches
 * 0.44 %, two or four as the first descent's time fell 0.63 %; pr2392 at 1 s (0.4 ms), seeds 1–8: two
 * searches 0.77 %, four 0.87 %.
 */
export const MANY_STREAMS_MS_PER_POINT = 0.5;
/** Share of the budget after the first descent that continues from the merged child. */
export const TAIL_SHARE = 0.3;

/**
 * Improves a circuit until `budget` expires. It first takes `order` to a local optimum of the k-opt
 * search over the candidate lists, then kicks it (see above); below STREAMS_MIN_POINTS one search has
 * the whole budget. The k-opt search against ./local.ts's 2-opt / Or-opt / Lin–Kernighan chains behind
 * the kicks (1 s CPU, seeds 1–4, same run): kroA200, lin318, pr439, rat575, u724 mean 0.030 % against
 * 0.076 % above the optimum; pr1002 0.34 % against 0.52 %; d1291 0.54 % against 1.03 %; random trips of
 * 100–199 stops at 30 ms as good or better (150 stops: 0.15 % against 0.49 % above a 500 ms run).
 * Trips of ≤ 12 points are solved exactly by Held–Karp (a few milliseconds) when the budget allows.
 * Needs a finite budget; each kick costs O(segment) plus a local repair and, when rejected, its undo.
 * Returns the circuit from an arbitrary point (the caller rotates it to the depot).
 */
export function improveDeep(m: DistanceMatrix, order: ArrayLike<number>, budget: Budget, rng: Rng, neighbors?: Neighbors): number[] {
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
  // How many searches is settled on the budget as it comes, not on what the first descent leaves of it:
  // that descent's time varies from run to run (the code is compiled as it runs) and sat at the line
  // between two and four searches on d1291 at 1 s, so seeds drew either.
  const streams = streamsFor(n, Math.max(0, budget.deadline - budget.clock()));
  const ls = createKOptSearch(m, neighbors ?? neighborLists(m, neighborsFor(n)));
  ls.load(order);
  ls.run(budget, n <= DEEP_FULL_SCAN_MAX_POINTS);
  if (n < 8) return Array.from(ls.tour);
  // Independent searches, each from its own circuit, their circuits merged, and the search goes on from the child.
  const clock = budget.clock;
  const total = Math.max(0, budget.deadline - clock());
  if (streams === 1) return iterate(ls, budget, rng);
  const start = Array.from(ls.tour);
  let held: number[] | undefined;
  let heldLength = Infinity;
  const share = (1 - TAIL_SHARE) / streams;
  for (let s = 0; s < streams && !budget.expired(); s++) {
    const part = budgetUntil(budget, s === streams - 1 ? budget.deadline - total * TAIL_SHARE : clock() + total * share);
    if (s > 0) {
      // Its own starting circuit: nearest neighbor from a random point, taken to a local optimum.
      ls.load(nearestNeighbor(m, rng.int(n), ls.neighbors));
      ls.run(part, false);
    }
    const found = iterate(ls, part, rng);
    if (!held) {
      held = found;
      heldLength = circuitLength(m, found);
    } else {
      const child = mergeCircuits(m, held, found);
      if (child.length < heldLength) {
        held = child.order;
        heldLength = child.length;
      }
    }
  }
  if (!held || budget.expired()) return held ?? start;
  ls.load(held);
  ls.run(budget, false);
  const last = iterate(ls, budget, rng);
  return circuitLength(m, last) <= heldLength ? last : held;
}

/**
 * Searches for n points and `ms` of budget: one below STREAMS_MIN_POINTS, MANY_STREAMS while the
 * budget gives each point at least MANY_STREAMS_MS_PER_POINT, DEEP_STREAMS otherwise.
 */
export function streamsFor(n: number, ms: number): number {
  if (n < STREAMS_MIN_POINTS) return 1;
  return ms >= MANY_STREAMS_MS_PER_POINT * n ? MANY_STREAMS : DEEP_STREAMS;
}

/**
 * Kicks the circuit loaded in `ls` (a local optimum) until `budget` expires; returns the best circuit met.
 */
function iterate(ls: LocalSearch, budget: Budget, rng: Rng): number[] {
  const n = ls.tour.length;
  // Three segments of 1…maxSeg points each, leaving at least two points outside them.
  const maxSeg = Math.max(1, Math.min(KICK_SEGMENT_MAX, Math.floor((n - 2) / 3)));
  const K = ls.neighbors.k;
  const list = ls.neighbors.list;
  // Lengths relative to the circuit loaded: `cur` for the circuit held, `best` for the best met.
  const slack = (ACCEPT_SLACK * ls.length()) / n;
  let cur = 0;
  let best = 0;
  const bestTour = Int32Array.from(ls.tour);
  const tiny = 1e-9 * Math.max(1, slack);
  while (!budget.expired()) {
    // Three segments S1 S2 S3 after `at` put in reverse order (… a S1 S2 S3 e … → … a S3 S2 S1 e …).
    const v = rng.int(n);
    let at = ls.positionOf(v) + 1;
    let l1 = 1 + rng.int(maxSeg);
    let l2 = 1 + rng.int(maxSeg);
    let l3 = 1 + rng.int(maxSeg);
    if (K > 0 && rng.next() < 0.5) {
      // Between a point and one of its candidates w: S1 S2 fill the path from v to w (the shorter way
      // round), so the first new edge is (v, w) itself — with α-nearness candidates often a link to
      // the next row that no kick within one row would make.
      const w = list[v * K + rng.int(K)]!;
      let gap = (ls.positionOf(w) - ls.positionOf(v) + n) % n;
      if (gap > n / 2) {
        gap = n - gap;
        at = ls.positionOf(w) + 1;
      }
      if (gap < 3) continue;
      l1 = 1 + rng.int(gap - 2);
      l2 = gap - 1 - l1;
      l3 = Math.min(l3, n - 1 - gap);
    }
    ls.mark();
    ls.doubleBridge(at, l1, l2, l3);
    const finished = ls.run(budget, false);
    const change = ls.change();
    if (finished && (change <= 0 || cur + change <= best + slack)) {
      ls.commit();
      cur += change;
      if (cur < best - tiny) {
        best = cur;
        bestTour.set(ls.tour);
      }
    } else ls.rollback();
  }
  // The circuit held may be up to `slack` above the best met: return the best.
  if (cur > best) return Array.from(bestTour);
  return Array.from(ls.tour);
}
