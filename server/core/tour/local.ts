/**
 * Local improvement of a circuit by 2-opt (G. A. Croes, Operations Research 6(6), 1958) and Or-opt
 * (I. Or, PhD thesis, Northwestern University, 1976: move a segment of 1–3 points elsewhere, either
 * way round). Candidate moves come from K-nearest neighbour lists with don't-look bits (J. L. Bentley,
 * ORSA J. Computing 4(4), 1992); a final scan over every move makes the result a true local optimum.
 */
import type { DistanceMatrix } from '../matrix';
import type { Budget } from './budget';

/** Neighbour-list length: 10 nearest is the usual choice for 2-opt-style searches (common practice). */
export const DEFAULT_NEIGHBORS = 10;

export interface LocalMoves {
  twoOpt: boolean;
  orOpt: boolean;
}

const BOTH: LocalMoves = { twoOpt: true, orOpt: true };

/** Each point's K nearest others, row-major in n·K entries: nearest first, lower index on ties. */
export interface Neighbors {
  k: number;
  list: Int32Array;
}

/**
 * For each point its `k` nearest others, nearest first (ties: lower index first), row-major in one
 * array of n·k entries. O(n²·k) time.
 */
export function neighborLists(m: DistanceMatrix, k: number): Neighbors {
  const n = m.n;
  const kk = Math.max(0, Math.min(k, n - 1));
  const list = new Int32Array(n * kk);
  const dist = new Float64Array(kk);
  for (let i = 0; i < n; i++) {
    let size = 0;
    const base = i * kk;
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      const v = m.d[i * n + j]!;
      if (size === kk && !(v < dist[kk - 1]!)) continue;
      // Insertion into the sorted prefix; equal lengths keep the earlier (lower) index first.
      let p = size < kk ? size++ : kk - 1;
      while (p > 0 && dist[p - 1]! > v) {
        dist[p] = dist[p - 1]!;
        list[base + p] = list[base + p - 1]!;
        p--;
      }
      dist[p] = v;
      list[base + p] = j;
    }
  }
  return { k: kk, list };
}

/**
 * A reusable 2-opt / Or-opt searcher over one matrix: preallocated arrays, so iterated local search
 * can reload circuits without allocating.
 */
export interface LocalSearch {
  /** Loads a circuit (any rotation) and marks every point active, or only `active` when given. */
  load(order: ArrayLike<number>, active?: ArrayLike<number>): void;
  /**
   * Applies improving moves until none is left among the active points' neighbours, then (when
   * `full`) scans every move and resumes if one improves. Stops early when `budget` expires.
   * Returns false when it stopped on the budget.
   */
  run(budget: Budget | undefined, full: boolean): boolean;
  /** Current circuit in tour order, starting anywhere. */
  readonly tour: Int32Array;
  /** Current length in metres. */
  length(): number;
}

export function createLocalSearch(
  m: DistanceMatrix,
  moves: LocalMoves = BOTH,
  neighbors = neighborLists(m, DEFAULT_NEIGHBORS),
): LocalSearch {
  const n = m.n;
  const d = m.d;
  const K = neighbors.k;
  const nb = neighbors.list;
  const tour = new Int32Array(n);
  const pos = new Int32Array(n);
  const queue = new Int32Array(n);
  const queued = new Uint8Array(n);
  let qHead = 0;
  let qSize = 0;
  let maxD = 0;
  for (let i = 0; i < n * n; i++) if (d[i]! > maxD && Number.isFinite(d[i]!)) maxD = d[i]!;
  // Moves must gain more than rounding noise, or equal-length circuits could swap forever.
  const eps = 1e-9 * Math.max(1, maxD);

  const push = (c: number): void => {
    if (queued[c]) return;
    queued[c] = 1;
    queue[(qHead + qSize) % n] = c;
    qSize++;
  };
  const succ = (c: number): number => tour[pos[c]! + 1 === n ? 0 : pos[c]! + 1]!;
  const pred = (c: number): number => tour[pos[c]! === 0 ? n - 1 : pos[c]! - 1]!;
  const dist = (a: number, b: number): number => d[a * n + b]!;

  /** Reverses the tour path from u forward to v (or, equivalently, its shorter complement). */
  const reversePath = (u: number, v: number): void => {
    let i = pos[u]!;
    let j = pos[v]!;
    let len = ((j - i + n) % n) + 1;
    if (2 * len > n) {
      const ni = j + 1 === n ? 0 : j + 1;
      j = i === 0 ? n - 1 : i - 1;
      i = ni;
      len = n - len;
    }
    for (let s = len >> 1; s > 0; s--) {
      const a = tour[i]!;
      const b = tour[j]!;
      tour[i] = b;
      pos[b] = i;
      tour[j] = a;
      pos[a] = j;
      i = i + 1 === n ? 0 : i + 1;
      j = j === 0 ? n - 1 : j - 1;
    }
  };

  const segBuf = new Int32Array(3);
  /**
   * Moves the segment of `L` points starting at s1 (forward) between x and y = succ(x), as x s1…s2 y
   * or (reversed) x s2…s1 y, shifting whichever side of the circuit is shorter.
   */
  const moveSegment = (s1: number, L: number, x: number, reversed: boolean): void => {
    const i0 = pos[s1]!;
    for (let k = 0; k < L; k++) segBuf[k] = tour[(i0 + k) % n]!;
    const nxPos = (i0 + L) % n;
    const lenX = ((pos[x]! - nxPos + n) % n) + 1;
    const lenY = n - L - lenX;
    let start: number;
    if (lenX <= lenY) {
      for (let k = 0; k < lenX; k++) {
        const c = tour[(i0 + L + k) % n]!;
        const p = (i0 + k) % n;
        tour[p] = c;
        pos[c] = p;
      }
      start = (i0 + lenX) % n;
    } else {
      start = (i0 - lenY + n) % n;
      for (let k = lenY - 1; k >= 0; k--) {
        const c = tour[(start + k) % n]!;
        const p = (start + k + L) % n;
        tour[p] = c;
        pos[c] = p;
      }
    }
    for (let k = 0; k < L; k++) {
      const c = segBuf[reversed ? L - 1 - k : k]!;
      const p = (start + k) % n;
      tour[p] = c;
      pos[c] = p;
    }
  };

  const inSegment = (c: number, s1: number, L: number): boolean => (pos[c]! - pos[s1]! + n) % n < L;

  /** Tries 2-opt moves with a new edge at `a`; applies the first improving one. */
  const twoOptAt = (a: number): boolean => {
    for (let dir = 0; dir < 2; dir++) {
      const b = dir === 0 ? succ(a) : pred(a);
      const dab = dist(a, b);
      for (let t = 0; t < K; t++) {
        const c = nb[a * K + t]!;
        const dac = dist(a, c);
        // A gainful move has a new edge shorter than the old edge at one of its ends (Bentley 1992).
        if (!(dac < dab)) break;
        const e = dir === 0 ? succ(c) : pred(c);
        if (c === b || e === a) continue;
        const delta = dac + dist(b, e) - dab - dist(c, e);
        if (delta < -eps) {
          if (dir === 0) reversePath(b, c);
          else reversePath(a, e);
          push(a);
          push(b);
          push(c);
          push(e);
          return true;
        }
      }
    }
    return false;
  };

  /** Evaluates inserting segment s1..s2 (L points, removal gain `gain`) into edge (x, succ x). */
  const tryInsert = (s1: number, s2: number, L: number, gain: number, x: number): boolean => {
    const y = succ(x);
    if (inSegment(x, s1, L) || inSegment(y, s1, L)) return false;
    const dxy = dist(x, y);
    const fwd = dist(x, s1) + dist(s2, y) - dxy;
    const rev = dist(x, s2) + dist(s1, y) - dxy;
    const reversed = rev < fwd;
    if ((reversed ? rev : fwd) - gain < -eps) {
      const p = pred(s1);
      const nx = succ(s2);
      moveSegment(s1, L, x, reversed);
      push(p);
      push(nx);
      push(s1);
      push(s2);
      push(x);
      push(y);
      return true;
    }
    return false;
  };

  /** Tries Or-opt moves of segments with an end at `a`; applies the first improving one. */
  const orOptAt = (a: number): boolean => {
    for (let L = 1; L <= 3 && n - L >= 3; L++) {
      for (let side = 0; side < (L === 1 ? 1 : 2); side++) {
        const s1 = side === 0 ? a : tour[(pos[a]! - L + 1 + n) % n]!;
        const s2 = side === 0 ? tour[(pos[a]! + L - 1) % n]! : a;
        const p = pred(s1);
        const nx = succ(s2);
        const gain = dist(p, s1) + dist(s2, nx) - dist(p, nx);
        for (let end = 0; end < 2; end++) {
          const from = end === 0 ? s1 : s2;
          // Only new edges shorter than the old edge at that end: the 3-opt gain criterion (Lin &
          // Kernighan 1973) prunes most candidates; the closing full scan catches anything it skips.
          const limit = end === 0 ? dist(p, s1) : dist(s2, nx);
          for (let t = 0; t < K; t++) {
            const c = nb[from * K + t]!;
            if (!(dist(from, c) < limit)) break;
            if (inSegment(c, s1, L)) continue;
            if (tryInsert(s1, s2, L, gain, c)) return true;
            if (tryInsert(s1, s2, L, gain, pred(c))) return true;
          }
        }
      }
    }
    return false;
  };

  /** Scans every 2-opt move; applies the first improving one. O(n²). */
  const fullTwoOpt = (budget: Budget | undefined): boolean => {
    for (let i = 0; i < n - 2; i++) {
      if ((i & 15) === 0 && budget?.expired()) return false;
      const a = tour[i]!;
      const b = tour[i + 1]!;
      const dab = dist(a, b);
      for (let j = i + 2; j < n; j++) {
        if (i === 0 && j === n - 1) continue;
        const c = tour[j]!;
        const e = tour[j + 1 === n ? 0 : j + 1]!;
        if (dist(a, c) + dist(b, e) - dab - dist(c, e) < -eps) {
          reversePath(b, c);
          push(a);
          push(b);
          push(c);
          push(e);
          return true;
        }
      }
    }
    return false;
  };

  /** Scans every Or-opt move (segments of 1–3, both orientations, every edge). O(n²). */
  const fullOrOpt = (budget: Budget | undefined): boolean => {
    for (let L = 1; L <= 3 && n - L >= 3; L++) {
      for (let i = 0; i < n; i++) {
        if ((i & 15) === 0 && budget?.expired()) return false;
        const s1 = tour[i]!;
        const s2 = tour[(i + L - 1) % n]!;
        const p = pred(s1);
        const nx = succ(s2);
        const gain = dist(p, s1) + dist(s2, nx) - dist(p, nx);
        for (let k = 0; k < n; k++) {
          if (tryInsert(s1, s2, L, gain, tour[k]!)) return true;
        }
      }
    }
    return false;
  };

  return {
    tour,
    load(order, active) {
      for (let i = 0; i < n; i++) {
        tour[i] = order[i]!;
        pos[order[i]!] = i;
      }
      queued.fill(0);
      qHead = 0;
      qSize = 0;
      if (active) for (let i = 0; i < active.length; i++) push(active[i]!);
      else for (let i = 0; i < n; i++) push(tour[i]!);
    },
    run(budget, full) {
      if (n < 4) return true;
      for (;;) {
        let steps = 0;
        while (qSize > 0) {
          if ((++steps & 63) === 0 && budget?.expired()) return false;
          const a = queue[qHead]!;
          qHead = qHead + 1 === n ? 0 : qHead + 1;
          qSize--;
          queued[a] = 0;
          while ((moves.twoOpt && twoOptAt(a)) || (moves.orOpt && orOptAt(a))) {
            if ((++steps & 63) === 0 && budget?.expired()) return false;
          }
        }
        if (!full) return true;
        if (budget?.expired()) return false;
        const found = (moves.twoOpt && fullTwoOpt(budget)) || (moves.orOpt && fullOrOpt(budget));
        if (!found) return !budget?.expired();
      }
    },
    length() {
      let s = 0;
      for (let i = 0; i < n; i++) s += dist(tour[i]!, tour[i + 1 === n ? 0 : i + 1]!);
      return s;
    },
  };
}

/**
 * Improves `order` to a local optimum of the chosen moves (default 2-opt and Or-opt): no 2-opt move
 * and no move of a 1–3 point segment shortens it by more than 1e-9 of the longest distance.
 * Typical cost near O(n·K) per pass with K = 10 neighbours plus an O(n²) closing scan. When `budget`
 * expires first, the circuit reached so far is returned (never longer than the input).
 * Returns the circuit in tour order from an arbitrary point; `canonicalize` rotates it to the depot.
 */
export function improveLocal(
  m: DistanceMatrix,
  order: ArrayLike<number>,
  budget?: Budget,
  moves: LocalMoves = BOTH,
  neighbors?: Neighbors,
): number[] {
  if (m.n < 4) return Array.from(order);
  const ls = createLocalSearch(m, moves, neighbors);
  ls.load(order);
  ls.run(budget, true);
  return Array.from(ls.tour);
}
