/**
 * Lin–Kernighan search whose step is a sequential k-opt move, k = 3…5 (S. Lin & B. W. Kernighan,
 * Operations Research 21(2), 1973; the 5-opt basis move of K. Helsgaun, "An effective implementation
 * of the Lin–Kernighan traveling salesman heuristic", European Journal of Operational Research 126(1),
 * 2000, sections 4–5). From a tour edge (t1, t2) the move takes t(2i+1) from t(2i)'s candidate list
 * while the partial gain stays positive (the positive gain criterion) and t(2i+2) either tour neighbour
 * of t(2i+1); a closing edge (t(2i+2), t1) that gains and leaves one Hamiltonian circuit is applied at
 * once. When none gains, the best feasible k-opt move is applied tentatively and the chain goes on from
 * (t1, t2k) with the accumulated gain, until a move gains or none is left; a chain that ends without a
 * gain is undone. Edges added in the chain are never removed again in it, and removed edges never
 * added back (Helsgaun 2000, section 5.3).
 *
 * Feasibility of any sequential move is tested as in K. Helsgaun, "General k-opt submoves for the
 * Lin–Kernighan TSP heuristic", Mathematical Programming Computation 1, 2009, section 3: the removed
 * edges, sorted by tour position, cut the circuit into k segments; walking segment, added edge,
 * segment, … from one segment's end visits all k segments exactly when the result is one circuit.
 * A move is applied by rewriting the array outside its longest segment (the other segments in the
 * walk's order, each either way round), O(n) at worst and O(points moved) for local moves; every
 * write goes to the same undo log as `mark`/`rollback` use.
 *
 * With penalties π (./alpha.ts) every comparison uses d(a, b) + π(a) + π(b), as ./local.ts does; a
 * move's change of length is the same either way, since each point keeps two edges.
 */
import type { DistanceMatrix } from '../matrix';
import type { Budget } from './budget';
import type { LocalSearch, Neighbors } from './local';
import { createKicks } from './kicks';
import { createPointQueue } from './queue';
import { comparisonOf } from './local';

/** Largest k of the sequential move (Helsgaun 2000's basis move). */
export const KOPT_MAX_K = 5;
/**
 * Default k: 3-opt steps with tentative chains. Measured inside `deep`'s kicks (TSPLIB 200–1,291
 * points, 1 s of CPU, seeds 1–5): k = 3 ran ≈ 4–7 thousand kicks per second, k = 5 ≈ 1–2 thousand,
 * and 3 reached the lower mean (see the experiment table in the report of this change).
 */
export const KOPT_DEFAULT_K = 3;
/** Candidates tried at each level t3, t5, t7, t9 for the next level (every candidate is tried for a closing). */
export const KOPT_DEFAULT_BREADTH: readonly number[] = [8, 5, 3, 2];
/** Tentative (non-gainful) k-opt moves per chain before it is given up (1, 3, 5, 6 tried; 3 best). */
export const KOPT_DEFAULT_CHAIN = 3;

export interface KOptOptions {
  /** k of the sequential move, 3…5 (default KOPT_DEFAULT_K). */
  k?: number;
  /** Candidates tried at each of the k − 1 levels (default KOPT_DEFAULT_BREADTH, missing entries 1). */
  breadth?: readonly number[];
  /** Tentative moves per chain (default KOPT_DEFAULT_CHAIN); 0 makes each step a plain best-gain k-opt. */
  chain?: number;
}

/**
 * A k-opt Lin–Kernighan search with the `LocalSearch` interface (./local.ts), so `improveDeep` can use
 * either. `run`'s `full` repeats a pass over every point until one finds nothing (no O(n²) scan).
 */
export interface KOptSearch extends LocalSearch {
  /**
   * True when, on the current circuit, taking out the edges (t[2j], t[2j+1]) and putting in
   * (t[2j+1], t[2j+2]) and (t[2k'−1], t[0]) leaves one circuit: the test the search itself applies.
   * Each (t[2j], t[2j+1]) must be a distinct edge of the circuit; 2 ≤ k' ≤ k.
   */
  isFeasible(t: ArrayLike<number>): boolean;
  /** Applies such a move when it is feasible (logged like every change); returns its length change, or NaN when it is not feasible. */
  applyMove(t: ArrayLike<number>): number;
}

export function createKOptSearch(m: DistanceMatrix, neighbors: Neighbors, opts: KOptOptions = {}): KOptSearch {
  const n = m.n;
  const d = m.d;
  const K = neighbors.k;
  const nb = neighbors.list;
  const k = Math.max(3, Math.min(KOPT_MAX_K, Math.floor(opts.k ?? KOPT_DEFAULT_K)));
  const breadth = new Int32Array(k);
  for (let i = 0; i < k - 1; i++) breadth[i + 1] = Math.max(1, Math.floor(opts.breadth?.[i] ?? KOPT_DEFAULT_BREADTH[i] ?? 1));
  const chainMax = Math.max(0, Math.floor(opts.chain ?? KOPT_DEFAULT_CHAIN));

  const tour = new Int32Array(n);
  const pos = new Int32Array(n);
  const queue = createPointQueue(n);

  const dist = comparisonOf(m, neighbors.pi);
  let maxD = 0;
  for (let i = 0; i < n; i++) if (d[i]! > maxD && Number.isFinite(d[i]!)) maxD = d[i]!;
  // Each point's cheapest candidate edge: a chain can only go on from t2k when its gain exceeds it.
  const minCand = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let best = Infinity;
    for (let t = 0; t < K; t++) {
      const v = dist(i, nb[i * K + t]!);
      if (v < best) best = v;
      const w = d[i * n + nb[i * K + t]!]!;
      if (w > maxD && Number.isFinite(w)) maxD = w;
    }
    minCand[i] = best;
  }
  // Moves must gain more than rounding noise, or equal-length circuits could swap forever.
  const eps = 1e-9 * Math.max(1, maxD);

  // Undo log (as ./local.ts): positions and old occupants, while `mark` is on or a chain is open.
  let acc = 0;
  let recording = false;
  let inChain = false;
  let logPos = new Int32Array(1024);
  let logVal = new Int32Array(1024);
  let logN = 0;
  const put = (p: number, c: number): void => {
    if (recording || inChain) {
      if (logN === logPos.length) {
        const a = new Int32Array(logN * 2);
        a.set(logPos);
        logPos = a;
        const b = new Int32Array(logN * 2);
        b.set(logVal);
        logVal = b;
      }
      logPos[logN] = p;
      logVal[logN] = tour[p]!;
      logN++;
    }
    tour[p] = c;
    pos[c] = p;
  };
  const undoTo = (mark: number): void => {
    for (let q = logN - 1; q >= mark; q--) {
      const p = logPos[q]!;
      const c = logVal[q]!;
      tour[p] = c;
      pos[c] = p;
    }
    logN = mark;
  };

  const push = queue.push;
  const succ = (c: number): number => tour[pos[c]! + 1 === n ? 0 : pos[c]! + 1]!;
  const pred = (c: number): number => tour[pos[c]! === 0 ? n - 1 : pos[c]! - 1]!;

  // The move under construction: t[0] = t1, t[1] = t2, …; removed edges (t[2j], t[2j+1]), added
  // edges (t[2j+1], t[2j+2]) and the closing (t[2k'-1], t[0]).
  const t = new Int32Array(2 * k);
  const bestT = new Int32Array(2 * k);
  let bestG = -Infinity;
  // Feasibility scratch: slots in tour order (seq) and each slot's place in it (rank).
  const seq = new Int32Array(2 * k);
  const rank = new Int32Array(2 * k);
  const edgeOrder = new Int32Array(k);
  const lo = new Int32Array(k);
  const buf = new Int32Array(Math.max(1, n));

  /** Sorts the kk removed edges of `tt` by tour position into seq/rank. */
  const order = (tt: Int32Array, kk: number): void => {
    for (let j = 0; j < kk; j++) {
      lo[j] = succ(tt[2 * j]!) === tt[2 * j + 1]! ? 2 * j : 2 * j + 1;
      // Insertion sort by the position of each edge's first point (k ≤ 5).
      let p = j;
      const key = pos[tt[lo[j]!]!]!;
      while (p > 0 && pos[tt[lo[edgeOrder[p - 1]!]!]!]! > key) {
        edgeOrder[p] = edgeOrder[p - 1]!;
        p--;
      }
      edgeOrder[p] = j;
    }
    for (let r = 0; r < kk; r++) {
      const j = edgeOrder[r]!;
      const a = lo[j]!;
      const b = a ^ 1;
      seq[2 * r] = a;
      seq[2 * r + 1] = b;
      rank[a] = 2 * r;
      rank[b] = 2 * r + 1;
    }
  };
  /** The slot joined to `slot` by an added edge: t2–t3, t4–t5, …, t2k–t1. */
  const partner = (slot: number, kk: number): number => (slot & 1 ? (slot + 1 === 2 * kk ? 0 : slot + 1) : slot === 0 ? 2 * kk - 1 : slot - 1);
  /** The other end of the segment at sorted place p (segments run from odd places to the next even one). */
  const across = (p: number, kk: number): number => (p & 1 ? (p + 1 === 2 * kk ? 0 : p + 1) : p === 0 ? 2 * kk - 1 : p - 1);

  /** True when removing the kk edges of `tt` and adding its kk sequential edges leaves one circuit. */
  const feasible = (tt: Int32Array, kk: number): boolean => {
    order(tt, kk);
    let p = 1;
    let count = 0;
    do {
      count++;
      p = rank[partner(seq[across(p, kk)]!, kk)]!;
    } while (p !== 1 && count <= kk);
    return count === kk;
  };

  /** Applies the feasible move of `tt` (kk edges): rewrites everything outside its longest segment. */
  const apply = (tt: Int32Array, kk: number): void => {
    order(tt, kk);
    const m2 = 2 * kk;
    let longest = 0;
    let longLen = -1;
    for (let r = 0; r < kk; r++) {
      const s = tt[seq[2 * r + 1]!]!;
      const e = tt[seq[(2 * r + 2) % m2]!]!;
      const len = ((pos[e]! - pos[s]! + n) % n) + 1;
      if (len > longLen) {
        longLen = len;
        longest = r;
      }
    }
    const endPlace = (2 * longest + 2) % m2;
    const startPlace = 2 * longest + 1;
    const at = pos[tt[seq[endPlace]!]!]! + 1;
    let w = 0;
    let p = rank[partner(seq[endPlace]!, kk)]!;
    while (p !== startPlace) {
      const q = across(p, kk);
      const a = tt[seq[p]!]!;
      const b = tt[seq[q]!]!;
      // The segment from a to b, forward when a is its start (odd place), else backward.
      let i = pos[a]!;
      const stop = pos[b]!;
      if (p & 1) {
        for (;;) {
          buf[w++] = tour[i]!;
          if (i === stop) break;
          i = i + 1 === n ? 0 : i + 1;
        }
      } else {
        for (;;) {
          buf[w++] = tour[i]!;
          if (i === stop) break;
          i = i === 0 ? n - 1 : i - 1;
        }
      }
      p = rank[partner(seq[q]!, kk)]!;
    }
    for (let x = 0, i = at % n; x < w; x++, i = i + 1 === n ? 0 : i + 1) {
      if (tour[i] !== buf[x]) put(i, buf[x]!);
    }
  };

  // Edges added and removed by the chain's tentative moves (pairs, either order), for the
  // "never remove an added edge, never add a removed one" rule.
  const CHAIN_EDGES = 2 * k * (chainMax + 1);
  const addA = new Int32Array(CHAIN_EDGES);
  const addB = new Int32Array(CHAIN_EDGES);
  const delA = new Int32Array(CHAIN_EDGES);
  const delB = new Int32Array(CHAIN_EDGES);
  let addN = 0;
  let delN = 0;
  const inList = (xa: Int32Array, xb: Int32Array, len: number, a: number, b: number): boolean => {
    for (let i = 0; i < len; i++) if ((xa[i] === a && xb[i] === b) || (xa[i] === b && xb[i] === a)) return true;
    return false;
  };
  // Points a chain touched, queued for the next pass when it gains.
  const touched = new Int32Array(2 * k * (chainMax + 1));
  let touchedN = 0;

  let budgetRef: Budget | undefined;
  let evals = 0;
  let aborted = false;
  let closeGain = 0;
  let foundK = 0;

  /**
   * Extends the move with level i (t[2i], t[2i+1]) given i removed edges and partial gain G.
   * Returns true when a gainful feasible closing was found (left in t, foundK edges, closeGain).
   */
  const extend = (i: number, G: number): boolean => {
    const t2i = t[2 * i - 1]!;
    const sp = succ(t2i);
    const pp = pred(t2i);
    let tried = 0;
    const width = breadth[i]!;
    // Every candidate is tried for a gainful closing at this level; the first `width` that pass the
    // gain criterion are also extended to the next level.
    for (let c = 0; c < K; c++) {
      const t3 = nb[t2i * K + c]!;
      if (t3 === sp || t3 === pp) continue;
      const g1 = G - dist(t2i, t3);
      if (!(g1 > eps)) continue;
      if (delN > 0 && inList(delA, delB, delN, t2i, t3)) continue;
      const deeper = tried++ < width;
      for (let side = 0; side < 2; side++) {
        const t4 = side === 0 ? succ(t3) : pred(t3);
        if (t4 === t[0]) continue;
        // (t3, t4) must not be an edge already removed in this move or added earlier in the chain.
        let dup = false;
        for (let j = 0; j < i; j++) {
          const a = t[2 * j]!;
          const b = t[2 * j + 1]!;
          if ((a === t3 && b === t4) || (a === t4 && b === t3)) {
            dup = true;
            break;
          }
        }
        if (dup || (addN > 0 && inList(addA, addB, addN, t3, t4))) continue;
        if ((++evals & 255) === 0 && budgetRef?.expired()) {
          aborted = true;
          return false;
        }
        t[2 * i] = t3;
        t[2 * i + 1] = t4;
        const g2 = g1 + dist(t3, t4);
        const kk = i + 1;
        const close = g2 - dist(t4, t[0]!);
        if (close > eps && !(delN > 0 && inList(delA, delB, delN, t4, t[0]!)) && feasible(t, kk)) {
          closeGain = close;
          foundK = kk;
          return true;
        }
        if (!deeper) continue;
        if (kk < k) {
          if (extend(kk, g2)) return true;
          if (aborted) return false;
        } else if (g2 > bestG && g2 - minCand[t4]! > eps && !(delN > 0 && inList(delA, delB, delN, t4, t[0]!)) && feasible(t, kk)) {
          bestG = g2;
          bestT.set(t);
        }
      }
    }
    return false;
  };

  /** A chain from the tour edge (t1, t2); applies it and returns true when it gains. */
  const chainFrom = (t1: number, t2: number): boolean => {
    const logMark = logN;
    inChain = true;
    addN = 0;
    delN = 0;
    touchedN = 0;
    let G0 = dist(t1, t2);
    let cur2 = t2;
    for (let step = 0; ; step++) {
      t[0] = t1;
      t[1] = cur2;
      bestG = -Infinity;
      if (extend(1, G0)) {
        apply(t, foundK);
        acc -= closeGain;
        for (let j = 0; j < 2 * foundK; j++) touched[touchedN++ % touched.length] = t[j]!;
        inChain = false;
        if (!recording) logN = logMark;
        for (let j = 0; j < Math.min(touchedN, touched.length); j++) push(touched[j]!);
        return true;
      }
      if (aborted || bestG === -Infinity || step >= chainMax) break;
      apply(bestT, k);
      for (let j = 0; j < k; j++) {
        delA[delN] = bestT[2 * j]!;
        delB[delN++] = bestT[2 * j + 1]!;
        if (j < k - 1) {
          addA[addN] = bestT[2 * j + 1]!;
          addB[addN++] = bestT[2 * j + 2]!;
        }
      }
      for (let j = 0; j < 2 * k; j++) touched[touchedN++ % touched.length] = bestT[j]!;
      G0 = bestG;
      cur2 = bestT[2 * k - 1]!;
    }
    undoTo(logMark);
    inChain = false;
    return false;
  };

  const improveAt = (a: number): boolean => chainFrom(a, succ(a)) || (!aborted && chainFrom(a, pred(a)));

  const kicks = createKicks({ tour, dist, put, push });

  return {
    tour,
    load(orderIn, active) {
      for (let i = 0; i < n; i++) {
        tour[i] = orderIn[i]!;
        pos[orderIn[i]!] = i;
      }
      queue.clear();
      acc = 0;
      if (active) for (let i = 0; i < active.length; i++) push(active[i]!);
      else for (let i = 0; i < n; i++) push(tour[i]!);
    },
    run(budget, full) {
      if (n < 5 || K === 0) return true;
      budgetRef = budget;
      aborted = false;
      evals = 0;
      let pops = 0;
      for (;;) {
        let gained = false;
        while (queue.size() > 0) {
          // Chains check the budget themselves every 256 evaluations; this catches runs of cheap points.
          if ((++pops & 63) === 0 && budget?.expired()) return false;
          const a = queue.pop();
          while (improveAt(a)) gained = true;
          if (aborted) return false;
        }
        // With `full`, passes over every point until one finds nothing.
        if (!full || !gained) return true;
        for (let i = 0; i < n; i++) push(tour[i]!);
      }
    },
    length() {
      let s = 0;
      for (let i = 0; i < n; i++) s += d[tour[i]! * n + tour[i + 1 === n ? 0 : i + 1]!]!;
      return s;
    },
    mark() {
      recording = true;
      logN = 0;
      acc = 0;
    },
    change() {
      return acc;
    },
    rollback() {
      recording = false;
      undoTo(0);
      queue.clear();
    },
    commit() {
      recording = false;
      logN = 0;
    },
    swapSegments(at, l1, l2) {
      const delta = kicks.swapSegments(at, l1, l2);
      acc += delta;
      return delta;
    },
    doubleBridge(at, l1, l2, l3) {
      const delta = kicks.doubleBridge(at, l1, l2, l3);
      acc += delta;
      return delta;
    },
    positionOf(c) {
      return pos[c]!;
    },
    neighbors,
    isFeasible(moveT) {
      const kk = moveT.length >> 1;
      if (kk < 2 || kk > k || moveT.length !== 2 * kk) throw new RangeError(`a move of 2 to ${k} edges is ${2 * k} points at most, got ${moveT.length}`);
      for (let j = 0; j < 2 * kk; j++) t[j] = moveT[j]!;
      return feasible(t, kk);
    },
    applyMove(moveT) {
      if (!this.isFeasible(moveT)) return NaN;
      const kk = moveT.length >> 1;
      let delta = 0;
      for (let j = 0; j < kk; j++) delta += d[t[2 * j + 1]! * n + t[(2 * j + 2) % (2 * kk)]!]! - d[t[2 * j]! * n + t[2 * j + 1]!]!;
      apply(t, kk);
      acc += delta;
      for (let j = 0; j < 2 * kk; j++) push(t[j]!);
      return delta;
    },
  };
}
