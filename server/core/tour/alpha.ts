/**
 * α-nearness candidate lists (K. Helsgaun, "An effective implementation of the Lin–Kernighan traveling
 * salesman heuristic", European Journal of Operational Research 126(1), 2000, sections 4.1–4.2): the
 * α-value of an edge (i, j) is how much the minimum 1-tree grows when it is forced to contain (i, j),
 * under node penalties π raised by subgradient steps (M. Held & R. M. Karp, Operations Research 18(6),
 * 1970). Edges of optimal circuits have small α far more often than they are among the nearest few:
 * on point sets laid out in rows (drilling boards, racks) the nearest neighbours of a point all lie in
 * its own row, while its small-α edges also reach the next row.
 */
import type { DistanceMatrix } from '../matrix';
import type { Budget } from './budget';
import type { Neighbors } from './local';
import { createOneTree } from './one-tree';

export interface AlphaOptions {
  /** Candidates per point. */
  k: number;
  /** Length of a known circuit: steers the subgradient steps (Polyak's rule). */
  upper: number;
  /** Ends the subgradient steps (at least one 1-tree is always built). */
  budget: Budget;
  /** Most subgradient steps; default 4·√n + 20. */
  maxSteps?: number;
  /** The 1-tree's special point (joined by its two cheapest edges); default 0. */
  special?: number;
  /** Checked every 64 rows of the α-values: when it expires, no lists are returned (undefined). */
  stop?: Budget;
}

/**
 * For each point its `k` candidates of least α (ties: shorter, then lower index), listed nearest first
 * (ties: lower index) so the gain tests that stop at the first too-long candidate stay valid.
 * O(n²) per subgradient step and O(n²) (plus O(n·k) per insertion) for the α-values.
 */
export function alphaNeighbors(m: DistanceMatrix, opts: AlphaOptions): Neighbors | undefined {
  const n = m.n;
  const d = m.d;
  const kk = Math.max(0, Math.min(opts.k, n - 1));
  const list = new Int32Array(n * kk);
  if (kk === 0) return { k: 0, list };
  const special = opts.special ?? 0;
  const pi = ascend(m, opts.upper, opts.budget, opts.maxSteps ?? Math.round(4 * Math.sqrt(n) + 20), special);

  // The minimum 1-tree under π, with the order points joined its spanning tree (a parent before its children).
  const tree = createOneTree(m, special);
  tree.pi.set(pi);
  tree.build();
  const { parent, order } = tree;
  // α(special, j) = w(special, j) − the second of its two cheapest edges.
  const srow = special * n;
  const { a: sa, b: sb, wb } = tree.ends;
  const alphaSpecial = (v: number): number => (v === sa || v === sb ? 0 : d[srow + v]! + pi[special]! + pi[v]! - wb);

  // Best k per row by (α, length, index), kept in small sorted arrays.
  const ka = new Float64Array(n * kk).fill(Infinity);
  const kd = new Float64Array(n * kk).fill(Infinity);
  const size = new Int32Array(n);
  const worst = (i: number): number => (size[i]! < kk ? Infinity : ka[i * kk + kk - 1]!);
  const offer = (i: number, j: number, a: number): void => {
    const base = i * kk;
    const dij = d[i * n + j]!;
    let s = size[i]!;
    if (s === kk) {
      const la = ka[base + kk - 1]!;
      const ld = kd[base + kk - 1]!;
      if (a > la || (a === la && (dij > ld || (dij === ld && j > list[base + kk - 1]!)))) return;
      s = kk - 1;
    } else size[i] = s + 1;
    let p = s;
    while (p > 0) {
      const pa = ka[base + p - 1]!;
      const pd = kd[base + p - 1]!;
      if (pa < a || (pa === a && (pd < dij || (pd === dij && list[base + p - 1]! < j)))) break;
      ka[base + p] = pa;
      kd[base + p] = pd;
      list[base + p] = list[base + p - 1]!;
      p--;
    }
    ka[base + p] = a;
    kd[base + p] = dij;
    list[base + p] = j;
  };

  // α(i, j) = w(i, j) − β(i, j), β the longest edge on the tree path from i to j: for each i, β along
  // i's path to the root, then every other point from its parent in join order (Helsgaun 2000, 4.2).
  // Everything indexed by join position, so the inner loop reads memory in order.
  const N1 = n - 1;
  const posOf = new Int32Array(n).fill(-1);
  for (let b = 0; b < N1; b++) posOf[order[b]!] = b;
  const parPos = new Int32Array(N1);
  const parW = new Float64Array(N1);
  const piOrd = new Float64Array(N1);
  for (let b = 0; b < N1; b++) {
    const j = order[b]!;
    const p = parent[j]!;
    piOrd[b] = pi[j]!;
    parPos[b] = p < 0 ? -1 : posOf[p]!;
    parW[b] = p < 0 ? -Infinity : d[j * n + p]! + pi[j]! + pi[p]!;
  }
  const beta = new Float64Array(N1);
  const mark = new Int32Array(N1).fill(-1);
  const rowOrd = new Float64Array(N1);
  for (let a = 0; a < N1; a++) {
    if ((a & 63) === 63 && opts.stop?.expired()) return undefined;
    const i = order[a]!;
    const irow = i * n;
    for (let b = 0; b < N1; b++) rowOrd[b] = d[irow + order[b]!]!;
    const base = pi[i]!;
    beta[a] = -Infinity;
    mark[a] = a;
    for (let u = a; parPos[u]! >= 0; u = parPos[u]!) {
      const p = parPos[u]!;
      beta[p] = beta[u]! > parW[u]! ? beta[u]! : parW[u]!;
      mark[p] = a;
    }
    // Only α below the row's current k-th best can enter it.
    for (let b = 0; b < N1; b++) {
      if (mark[b] !== a) {
        const bp = beta[parPos[b]!]!;
        beta[b] = bp > parW[b]! ? bp : parW[b]!;
      }
      if (b === a) continue;
      const al = rowOrd[b]! + base + piOrd[b]! - beta[b]!;
      if (al <= worst(i)) offer(i, order[b]!, al);
    }
    const as = alphaSpecial(i);
    offer(i, special, as);
    offer(special, i, as);
  }

  // Each row nearest first under π (ties: lower index).
  for (let i = 0; i < n; i++) {
    const base = i * kk;
    const s = size[i]!;
    for (let x = 1; x < s; x++) {
      const j = list[base + x]!;
      const dj = d[i * n + j]! + pi[j]!;
      let p = x;
      while (p > 0) {
        const q = list[base + p - 1]!;
        const dq = d[i * n + q]! + pi[q]!;
        if (dq < dj || (dq === dj && q < j)) break;
        list[base + p] = q;
        p--;
      }
      list[base + p] = j;
    }
  }
  return { k: kk, list, pi };
}

/**
 * Node penalties π from subgradient steps on the 1-tree bound: Polyak's step t = λ·(upper − L)/‖g‖²
 * with g the degree excess smoothed by the previous direction (Volgenant & Jonker, EJOR 9(1), 1982),
 * λ halved when the bound stalls; the π of the best bound is returned. O(n²) per step.
 */
export function ascend(m: DistanceMatrix, upper: number, budget: Budget, maxSteps: number, special = 0): Float64Array {
  const n = m.n;
  const bestPi = new Float64Array(n);
  if (n < 4) return bestPi;
  const tree = createOneTree(m, special);
  const { pi, deg } = tree;
  const g = new Float64Array(n);
  const gPrev = new Float64Array(n);
  const oneTree = (): number => tree.build();
  let bestL = -Infinity;
  let lambda = 0.05;
  let stall = 0;
  const period = Math.max(5, Math.round(maxSteps / 10));
  for (let it = 0; it < maxSteps && !budget.expired(); it++) {
    const L = oneTree();
    if (L > bestL) {
      bestL = L;
      bestPi.set(pi);
      stall = 0;
    } else if (++stall >= period) {
      lambda /= 2;
      stall = 0;
      pi.set(bestPi);
      gPrev.fill(0);
      oneTree();
    }
    let g2 = 0;
    for (let v = 0; v < n; v++) {
      const gv = deg[v]! - 2;
      g[v] = 0.7 * gv + 0.3 * gPrev[v]!;
      gPrev[v] = gv;
      g2 += g[v]! * g[v]!;
    }
    if (g2 === 0) break;
    const gap = Math.max(upper - L, 1e-9 * Math.max(1, Math.abs(upper)));
    const t = (lambda * gap) / g2;
    for (let v = 0; v < n; v++) pi[v] = pi[v]! + t * g[v]!;
  }
  return bestPi;
}
