/**
 * Held–Karp lower bound: the best 1-tree under node penalties π, raised by subgradient steps
 * (M. Held & R. M. Karp, "The traveling-salesman problem and minimum spanning trees", Operations
 * Research 18(6), 1970, and Part II, Mathematical Programming 1, 1971). Every π gives a valid bound;
 * the steps only make it tighter. Step rule: Polyak's, t = λ·(upper − L)/‖g‖², λ halved when the bound
 * stalls (Held, Wolfe & Crowder, Mathematical Programming 6, 1974).
 */
import type { DistanceMatrix } from '../matrix';
import type { Budget } from './budget';
import { createOneTree } from './one-tree';

export interface BoundResult {
  /** Metres; no closed circuit through every point is shorter. */
  lowerBound: number;
  /** Subgradient iterations run. */
  iterations: number;
  /** True when the best 1-tree was itself a circuit, so the bound is the optimum. */
  tight: boolean;
}

/**
 * Lower bound on the shortest circuit through all points of `m` (symmetric; triangle inequality not
 * needed). `upper` is the length of any known circuit (steers the step size). O(n²) per iteration
 * (Prim on the dense matrix); stops on the budget, on a circuit-shaped 1-tree, or when steps vanish.
 * For an all-integer matrix the bound is rounded up, since every circuit length is then an integer.
 * n ≤ 3 returns the length of the only circuit.
 */
export function oneTreeBound(m: DistanceMatrix, upper: number, budget: Budget, special = 0): BoundResult {
  const n = m.n;
  const d = m.d;
  if (n <= 1) return { lowerBound: 0, iterations: 0, tight: true };
  if (n <= 3) return { lowerBound: upper, iterations: 0, tight: true };

  let integral = true;
  for (let i = 0; i < n * n && integral; i++) integral = Number.isInteger(d[i]!);

  const tree = createOneTree(m, special);
  const { pi, deg } = tree;
  const bestPi = new Float64Array(n);
  const g = new Float64Array(n);
  const gPrev = new Float64Array(n);
  /** Builds the minimum 1-tree under π into `deg`; returns its penalised weight minus 2Σπ. */
  const oneTree = (): number => tree.build();

  let bestL = -Infinity;
  let lambda = 2;
  let stall = 0;
  // Halve λ after this many steps without a better bound (common practice: about n/2, at least 10).
  const period = Math.max(10, n >> 1);
  let iterations = 0;
  let tight = false;
  while (!budget.expired()) {
    iterations++;
    const L = oneTree();
    if (L > bestL + 1e-12 * Math.abs(L)) {
      bestL = L;
      bestPi.set(pi);
      stall = 0;
    } else if (++stall >= period || L < bestL - (upper - bestL)) {
      // Stalled, or a step overshot by more than the whole gap: halve λ and go back to the best π.
      lambda /= 2;
      stall = 0;
      if (lambda < 1e-6) break;
      pi.set(bestPi);
      gPrev.fill(0);
      oneTree();
    }
    let norm = 0;
    for (let v = 0; v < n; v++) {
      // Smoothing with the previous direction damps zig-zag (Volgenant & Jonker, EJOR 9(1), 1982).
      const gv = deg[v]! - 2;
      g[v] = 0.7 * gv + 0.3 * gPrev[v]!;
      gPrev[v] = gv;
      if (gv !== 0) norm += 1;
    }
    if (norm === 0) {
      tight = true;
      break;
    }
    let g2 = 0;
    for (let v = 0; v < n; v++) g2 += g[v]! * g[v]!;
    const gap = Math.max(upper - L, 1e-9 * Math.max(1, Math.abs(upper)));
    const t = (lambda * gap) / g2;
    for (let v = 0; v < n; v++) pi[v] = pi[v]! + t * g[v]!;
  }
  if (bestL === -Infinity) {
    pi.fill(0);
    bestL = oneTree();
    iterations = Math.max(iterations, 1);
  }
  // Summation rounding could lift the bound a hair above a circuit of equal length; step back by it.
  let lowerBound = bestL - 1e-9 * Math.max(1, Math.abs(bestL));
  if (integral) lowerBound = Math.ceil(lowerBound - 1e-6);
  if (lowerBound > upper) lowerBound = upper;
  return { lowerBound, iterations, tight };
}
