/**
 * The tour engine's entry points: a closed circuit for a trip (depot plus stops, shortest walking
 * distances between them) by a construction and an optional improvement, and the Held–Karp lower
 * bound that says how far any circuit can be from the shortest possible.
 */
import type { Clock } from '../clock';
import { defaultClock } from '../clock';
import type { DistanceMatrix } from '../matrix';
import { circuitLength } from '../matrix';
import { createRng } from '../rng';
import { alphaNeighbors } from './alpha';
import type { Budget } from './budget';
import { budgetOf, budgetUntil, TimeLimitError } from './budget';
import { oneTreeBound } from './bound';
import { canonicalize } from './circuit';
import { nearestNeighbor, repeatedNearestNeighbor, SORTED_EDGES_ALL_PAIRS_MAX, sortedEdges } from './construct';
import { improveDeep } from './deep';
import { heldKarp, HELD_KARP_MAX_POINTS } from './exact';
import type { Neighbors } from './local';
import { descend } from './descent';
import { localMovesFor, neighborLists, neighborsFor } from './local';

export { heldKarp, HELD_KARP_MAX_POINTS } from './exact';
export type { TourResult } from './exact';
export { TimeLimitError } from './budget';

export const TOUR_METHODS = ['nearest-neighbor', 'repeated-nearest-neighbor', 'sorted-edges', 'exact', 'best'] as const;
export type TourMethod = (typeof TOUR_METHODS)[number];

export const IMPROVE_MODES = ['none', 'local', 'deep'] as const;
export type ImproveMode = (typeof IMPROVE_MODES)[number];

/** `best` runs repeated nearest neighbor up to this many points, nearest neighbor from the depot above. */
export const BEST_REPEATED_MAX_POINTS = 1000;

/** Budget when the caller names none: enough for `deep` to matter, short enough for a request. */
export const DEFAULT_TIME_LIMIT_MS = 1000;

export interface SolveTourOptions {
  method: TourMethod;
  improve?: ImproveMode;
  /** Wall-clock budget for construction plus improvement, milliseconds. Default 1000. */
  timeLimitMs?: number;
  /** Seed for `deep`'s kicks; default 1. Same seed, same matrix, same budget outcome → same circuit. */
  seed?: number;
  /** Index of the depot in the matrix; default 0. */
  depot?: number;
  clock?: Clock;
}

export interface SolveTourResult {
  method: TourMethod;
  /** The improvement actually applied ('none' for `exact`, whose circuit cannot be improved). */
  improve: ImproveMode;
  /** Point indices, depot first, each index once. */
  order: number[];
  /** Metres, including the walk back to the depot. */
  length: number;
  /** Compute time, milliseconds. */
  ms: number;
}

/**
 * A closed circuit through every point of `m`, starting and ending at the depot.
 *
 * Constructions: nearest neighbor O(n²); repeated nearest neighbor O(n³) worst, ~O(n²·K) typical;
 * sorted edges O(n² log n) up to 128 points, from neighbour lists above; `best` runs repeated nearest
 * neighbor (nearest neighbor from the depot above 1,000 points) and sorted edges and keeps the shorter
 * (the first on a tie); `exact` is Held–Karp, O(2ⁿ·n²), at most 16 stops. Improvement: `local` =
 * 2-opt + Or-opt + Lin–Kernighan-style chains to a local optimum, `deep` = iterated local search for the
 * whole budget (α-nearness candidates from ALPHA_MIN_POINTS while n² ≤ ALPHA_PAIRS_PER_MS × the budget). With an improvement the construction stops at a quarter of the budget. Ties go to the lowest point index and the
 * circuit is reported in the direction whose first stop is lower than its last.
 *
 * The budget is checked inside every loop except one nearest-neighbor or sorted-edges pass, which
 * always completes (under 1 ms at 100 stops); an improvement cut short returns the circuit reached.
 * Trips of 1, 2 and 3 points have one circuit and return it.
 *
 * @throws RangeError for an empty matrix, a depot out of range, `exact` above 16 stops, or `deep`
 *   without a finite budget.
 * @throws TimeLimitError when `exact` cannot finish within `timeLimitMs` (no partial answer exists).
 */
export function solveTour(m: DistanceMatrix, opts: SolveTourOptions): SolveTourResult {
  const clock = opts.clock ?? defaultClock;
  const t0 = clock();
  const n = m.n;
  const depot = opts.depot ?? 0;
  const method = opts.method;
  let improve: ImproveMode = opts.improve ?? 'none';
  if (n === 0) throw new RangeError('a trip needs at least the depot');
  if (!Number.isInteger(depot) || depot < 0 || depot >= n) throw new RangeError(`depot ${depot} is out of range 0..${n - 1}`);
  if (!TOUR_METHODS.includes(method)) throw new RangeError(`unknown method '${String(method)}'`);
  if (!IMPROVE_MODES.includes(improve)) throw new RangeError(`unknown improve mode '${String(improve)}'`);
  const budget = budgetOf({ timeLimitMs: opts.timeLimitMs ?? DEFAULT_TIME_LIMIT_MS, clock });

  // One set of neighbour lists serves the constructions and the improvement.
  let cached: Neighbors | undefined;
  const lists = (): Neighbors => (cached ??= neighborLists(m, neighborsFor(n)));
  // Most of the budget goes to improvement: a construction followed by one stops at a quarter of it.
  const limit = opts.timeLimitMs ?? DEFAULT_TIME_LIMIT_MS;
  const build = improve === 'none' || limit === Infinity ? budget : budgetOf({ timeLimitMs: limit / 4, clock });

  let order: number[];
  switch (method) {
    case 'nearest-neighbor':
      order = nearestNeighbor(m, depot);
      break;
    case 'repeated-nearest-neighbor':
      order = repeatedNearestNeighbor(m, depot, build, lists());
      break;
    case 'sorted-edges':
      order = sortedEdges(m, depot, build, n > SORTED_EDGES_ALL_PAIRS_MAX ? lists() : undefined);
      break;
    case 'exact': {
      if (n > HELD_KARP_MAX_POINTS) {
        throw new RangeError(`exact is limited to ${HELD_KARP_MAX_POINTS - 1} stops; this trip has ${n - 1}`);
      }
      order = heldKarp(m, depot, { timeLimitMs: Math.max(0, budget.deadline - clock()), clock }).order;
      improve = 'none';
      break;
    }
    case 'best': {
      // Repeated nearest neighbor only where it pays (small trips); above that, one run from the depot.
      const a = n <= BEST_REPEATED_MAX_POINTS ? repeatedNearestNeighbor(m, depot, build, lists()) : nearestNeighbor(m, depot, lists());
      const b = sortedEdges(m, depot, build, n > SORTED_EDGES_ALL_PAIRS_MAX ? lists() : undefined);
      order = circuitLength(m, b) < circuitLength(m, a) ? b : a;
      break;
    }
  }

  if (improve === 'local') order = descend(m, order, budget, localMovesFor(n), lists());
  else if (improve === 'deep') {
    const search = usesAlpha(n, limit) ? (candidateLists(m, order, depot, limit, budget) ?? lists()) : lists();
    order = improveDeep(m, order, budget, createRng(opts.seed ?? 1), search);
  }
  canonicalize(order, depot);
  return { method, improve, order, length: circuitLength(m, order), ms: clock() - t0 };
}

/** From this many points `deep` searches α-nearness candidates (./alpha.ts) instead of the nearest. */
export const ALPHA_MIN_POINTS = 200;
/** α-nearness candidates per point (TSPLIB 318–1,291 points, `deep` 1 s, seeds 1–3: 16 better on average than 10 or 12). */
export const ALPHA_CANDIDATES = 16;
/**
 * The α-values cost O(n²) (about 0.1 s of CPU at 1,000 points, 0.65 s at 5,000 on this machine): `deep`
 * uses them when n² ≤ this × the budget in milliseconds (1 s: up to 1,581 points; 5 s: up to 3,535),
 * the nearest neighbours above.
 */
export const ALPHA_PAIRS_PER_MS = 2500;
/** Share of the budget for the subgradient steps that set the penalties π of the α-values (0.3 measured no better). */
export const ASCENT_SHARE = 0.15;

const usesAlpha = (n: number, limitMs: number): boolean => n >= ALPHA_MIN_POINTS && n * n <= ALPHA_PAIRS_PER_MS * limitMs;

/**
 * α-nearness candidate lists for `deep`, the subgradient steps within ASCENT_SHARE of the budget and
 * steered by the constructed circuit's length; undefined when the budget ends before the lists are
 * complete.
 */
function candidateLists(m: DistanceMatrix, order: number[], depot: number, limitMs: number, budget: Budget): Neighbors | undefined {
  const ascent = budgetUntil(budget, budget.clock() + limitMs * ASCENT_SHARE);
  return alphaNeighbors(m, { k: ALPHA_CANDIDATES, upper: circuitLength(m, order), budget: ascent, special: depot, stop: budget });
}

export interface HeldKarpBoundOptions {
  depot?: number;
  /** Budget in milliseconds; default 1000. At least one 1-tree (O(n²)) is always computed. */
  timeLimitMs?: number;
  clock?: Clock;
  /** Length of a known circuit to steer the steps; default: best construction + local, from the budget. */
  upperBound?: number;
}

export interface HeldKarpBoundResult {
  /** Metres; no closed circuit through every point is shorter. */
  lowerBound: number;
  /** Length of the circuit used as the upper bound, metres. */
  upperBound: number;
  iterations: number;
  /** True when the bound is proven to be the optimum (the best 1-tree was a circuit). */
  tight: boolean;
  ms: number;
}

/**
 * Held–Karp 1-tree lower bound with subgradient optimisation, within `timeLimitMs`. Every circuit is
 * at least `lowerBound` long, so a circuit of length L is at most (L / lowerBound − 1) above optimal.
 * O(n²) per iteration. n = 1 gives 0; n ≤ 3 gives the only circuit's length.
 *
 * @throws RangeError for an empty matrix or a depot out of range.
 */
export function heldKarpBound(m: DistanceMatrix, opts: HeldKarpBoundOptions = {}): HeldKarpBoundResult {
  const clock = opts.clock ?? defaultClock;
  const t0 = clock();
  const depot = opts.depot ?? 0;
  if (m.n === 0) throw new RangeError('a trip needs at least the depot');
  if (!Number.isInteger(depot) || depot < 0 || depot >= m.n) throw new RangeError(`depot ${depot} is out of range 0..${m.n - 1}`);
  const limit = opts.timeLimitMs ?? DEFAULT_TIME_LIMIT_MS;
  const budget = budgetOf({ timeLimitMs: limit, clock });
  // A tenth of the budget (at most) buys a good upper bound, which sets sensible step sizes.
  const upperBound = opts.upperBound ?? solveTour(m, { method: 'best', improve: 'local', depot, clock, timeLimitMs: Math.min(limit / 10, 100) }).length;
  const r = oneTreeBound(m, upperBound, budget, depot);
  return { lowerBound: r.lowerBound, upperBound, iterations: r.iterations, tight: r.tight, ms: clock() - t0 };
}

/** True for the error `exact` throws when no answer exists within the budget (not bad input). */
export const isTimeLimitError = (e: unknown): e is TimeLimitError => e instanceof TimeLimitError;
