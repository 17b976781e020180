/**
 * Local improvement of a circuit by 2-opt (G. A. Croes, Operations Research 6(6), 1958) and Or-opt
 * (I. Or, PhD thesis, Northwestern University, 1976: move a segment of 1–3 points elsewhere, either
 * way round) and a Lin–Kernighan-style sequential move (S. Lin & B. W. Kernighan, Operations Research
 * 21(2), 1973): a chain of up to LK_DEPTH 2-opt flips sharing the first city, each step's new edge from
 * the neighbour list while the partial gain stays positive (LK_BREADTH_WIDE candidates per level for
 * `local`, LK_BREADTH_NARROW for `deep`'s many repairs), kept only when closing the chain gains
 * (the "2-opt move" form of LK, D. S. Johnson & L. A. McGeoch, in Local Search in Combinatorial
 * Optimization, Wiley 1997). For `local` each level may instead take the other neighbour of t3 as t4 —
 * closing there would split the circuit — and add a third edge (t4, t5) with t5 between t2 and t3 and
 * t6 either neighbour of t5: the sequential 3-opt "or-3opt" move, which moves the segment t2…t3 (or
 * t6…t3) of any length elsewhere, either way round, and the chain goes on from (t1, t6) (Lin &
 * Kernighan 1973's alternate first step; K. Helsgaun, European Journal of Operational Research 126(1),
 * 2000, for the sequential 3-opt case analysis). Every chain is a sequence of 2-opt moves on the array,
 * logged and undone in reverse. Candidate moves come from K-nearest neighbour lists with don't-look bits
 * (J. L. Bentley, ORSA J. Computing 4(4), 1992); up to FULL_SCAN_MAX_POINTS a final scan over every
 * 2-opt and Or-opt move makes the result a true local optimum of those moves. Lists with penalties π
 * (α-nearness, ./alpha.ts) make every comparison use d(a, b) + π(a) + π(b); a move's change of length
 * is the same either way, since each point keeps two edges (K. Helsgaun, EJOR 126(1), 2000).
 */
import type { DistanceMatrix } from '../matrix';
import type { Budget } from './budget';
import { createKicks } from './kicks';
import { createPointQueue } from './queue';

/** Neighbour-list length: 10 nearest is the usual choice for 2-opt-style searches (common practice). */
export const DEFAULT_NEIGHBORS = 10;
/** Above WIDE_NEIGHBORS_FROM points the lists are this wide instead. */
export const WIDE_NEIGHBORS = 16;
/**
 * Up to this many points the closing scan over every move runs (one O(n²) pass applies every improving
 * move it meets, budget-checked); above it, the neighbour lists alone. Clustered instances (TSPLIB
 * pr439) need it: their 16 nearest all lie in one cluster.
 */
export const FULL_SCAN_MAX_POINTS = 2000;
/** Flips per Lin–Kernighan chain, and candidates tried at each level (breadth narrowing with depth: common practice). */
export const LK_DEPTH = 5;
/** Breadth per level for iterated search (`deep`), where many cheap repairs beat a few thorough ones. */
export const LK_BREADTH_NARROW: readonly number[] = [4, 2, 1, 1, 1];
/**
 * Breadth per level for one descent (`local`): wider first levels find the 3-opt-like moves the
 * narrow chains miss. Tuned on TSPLIB lin318–d1291 at 1 s (pr1002 3.19 % → 1.68 %, rat783 3.32 % →
 * 1.96 %, lin318 2.35 % → 1.44 % above the optimum, same machine and run).
 */
export const LK_BREADTH_WIDE: readonly number[] = [5, 5, 5, 3, 2];

/** Neighbour-list width for n points: DEFAULT_NEIGHBORS, or WIDE_NEIGHBORS above the full-scan size. */
export const neighborsFor = (n: number): number => (n > WIDE_NEIGHBORS_FROM ? WIDE_NEIGHBORS : DEFAULT_NEIGHBORS);
/** Above this many points the lists are WIDE_NEIGHBORS long. */
export const WIDE_NEIGHBORS_FROM = 150;

export interface LocalMoves {
  twoOpt: boolean;
  orOpt: boolean;
  /** Lin–Kernighan-style chains of 2-opt flips; off when omitted. */
  lk?: boolean;
  /** The chains' or-3opt alternative (segment insertion, see lkStep); off when omitted. */
  or3?: boolean;
  /** Chain levels (from the first) that try the or-3opt alternative; all when omitted. */
  or3Depth?: number;
  /** Candidates tried per chain level (LK_DEPTH entries); LK_BREADTH_NARROW when omitted. */
  lkBreadth?: readonly number[];
}

const BOTH: LocalMoves = { twoOpt: true, orOpt: true, lk: true };
/**
 * `local`'s moves: all three, with the wide chains and their or-3opt alternative (TSPLIB, one descent
 * from the best construction, same machine and run: lin318 1.44 → 1.25 %, pr439 5.33 → 2.00 %, rat783
 * 1.96 → 1.19 %, u724 1.34 → 1.08 %, d1291 4.14 → 3.54 %, pr1002 1.68 → 2.25 % above the optimum).
 * `deep`'s repairs leave it out: measured at 1 s it bought fewer kicks than it saved.
 */
export const LOCAL_MOVES: LocalMoves = { twoOpt: true, orOpt: true, lk: true, or3: true, lkBreadth: LK_BREADTH_WIDE };
/**
 * Above this many points `local` tries the or-3opt alternative at the chains' first level only: with
 * it at every level one descent through 5,000 random points took 1.7 s of CPU (0.8 s first level
 * only), so a 1 s budget cut it short 7 % above its end (load ≈ 15 on 2 cores; TSPLIB pr2392, 2,392
 * points, still gains: 2.94 → 2.17 % above the optimum with every level).
 */
export const OR3_ALL_LEVELS_MAX_POINTS = 2500;
/**
 * Up to this many points (a warehouse trip) `local` tries the or-3opt alternative at the chains' first
 * three levels, not the fourth: 1,000 random trips of 30 stops took 1,302 ms instead of 1,628 ms of
 * improvement for 0.004 % more total length (first two levels only: 807 ms, 0.04 % more; same machine
 * and run, quiet).
 */
export const OR3_SMALL_TRIP_MAX_POINTS = 150;
/**
 * `local`'s moves for n points: LOCAL_MOVES, the or-3opt alternative at the first three levels up to
 * OR3_SMALL_TRIP_MAX_POINTS and at the first level only above OR3_ALL_LEVELS_MAX_POINTS.
 */
export const localMovesFor = (n: number): LocalMoves =>
  n <= OR3_SMALL_TRIP_MAX_POINTS ? { ...LOCAL_MOVES, or3Depth: 3 } : n > OR3_ALL_LEVELS_MAX_POINTS ? { ...LOCAL_MOVES, or3Depth: 1 } : LOCAL_MOVES;

/** Each point's K nearest others, row-major in n·K entries: nearest first, lower index on ties. */
export interface Neighbors {
  k: number;
  list: Int32Array;
  /**
   * Node penalties π (./alpha.ts): the search then compares edges by d(a, b) + π(a) + π(b), which
   * changes no circuit's length (each point has two edges) but breaks the ties of regular layouts.
   */
  pi?: Float64Array;
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
  /** Current length in metres (O(n)). */
  length(): number;
  /** Starts recording every change to the circuit, so `rollback` can restore it (an undo log). */
  mark(): void;
  /** Restores the circuit to where `mark` was called and stops recording. O(changes). */
  rollback(): void;
  /** Stops recording and keeps the changes. */
  commit(): void;
  /**
   * Double-bridge kick in place (O. Martin, S. W. Otto & E. W. Felten, Complex Systems 5(3), 1991),
   * local form: the segments of `l1` and `l2` points starting at array position `at` swap places
   * (… a B C e … → … a C B e …); the four ends are queued for `run`. Returns the length change. O(l1 + l2).
   */
  swapSegments(at: number, l1: number, l2: number): number;
  /**
   * Double bridge in place (Martin, Otto & Felten 1991; the 4-opt move A1 A2 A3 A4 → A1 A4 A3 A2 as
   * D. S. Johnson & L. A. McGeoch, 1997, describe it), local form: the three segments of `l1`, `l2` and
   * `l3` points starting at array position `at` are put in reverse order, each kept the same way round
   * (… a S1 S2 S3 e … → … a S3 S2 S1 e …): four edges change and no sequential 3-opt move undoes it. The
   * eight ends are queued for `run`. Returns the length change. O(l1 + l2 + l3).
   */
  doubleBridge(at: number, l1: number, l2: number, l3: number): number;
  /** Length change (metres, negative when shorter) since the last `load` or `mark`. */
  change(): number;
  /** Array position of point c in `tour`. */
  positionOf(c: number): number;
  /** The neighbour lists the search uses. */
  readonly neighbors: Neighbors;
}

/**
 * The least gain a move must bring: 1e-9 of the longest distance seen, or equal-length circuits could
 * swap forever on rounding noise. The scale comes from the depot's row and each point's farthest listed
 * neighbour, in O(n) (not O(n²)).
 */
export function gainEpsilon(m: DistanceMatrix, neighbors: Neighbors): number {
  const { n, d } = m;
  const { k: K, list: nb } = neighbors;
  let maxD = 0;
  for (let i = 0; i < n; i++) if (d[i]! > maxD && Number.isFinite(d[i]!)) maxD = d[i]!;
  for (let i = 0; K > 0 && i < n; i++) {
    const v = d[i * n + nb[i * K + K - 1]!]!;
    if (v > maxD && Number.isFinite(v)) maxD = v;
  }
  return 1e-9 * Math.max(1, maxD);
}

/** Up to this many points a penalised search keeps its own copy of the matrix (8·n² bytes: 32 MB at 2,000). */
export const PENALISED_COPY_MAX_POINTS = 2000;

/**
 * The length a search compares for the pair (a, b): d(a, b), or with penalties π d(a, b) + π(a) + π(b).
 * With penalties up to PENALISED_COPY_MAX_POINTS one copy of the matrix with them added keeps one
 * lookup per comparison (deep's kicks ran about a fifth faster, TSPLIB pr439/u724, same run).
 */
export function comparisonOf(m: DistanceMatrix, pen: Float64Array | undefined): (a: number, b: number) => number {
  const n = m.n;
  const d = m.d;
  if (pen && n > PENALISED_COPY_MAX_POINTS) return (a, b) => d[a * n + b]! + pen[a]! + pen[b]!;
  const dp = pen ? penalised(d, pen, n) : d;
  return (a, b) => dp[a * n + b]!;
}

/** d(a, b) + π(a) + π(b) for every pair, row-major. */
function penalised(d: ArrayLike<number>, pi: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let a = 0; a < n; a++) {
    const row = a * n;
    const pa = pi[a]!;
    for (let b = 0; b < n; b++) out[row + b] = d[row + b]! + pa + pi[b]!;
  }
  return out;
}

export function createLocalSearch(m: DistanceMatrix, moves: LocalMoves = BOTH, neighbors = neighborLists(m, neighborsFor(m.n))): LocalSearch {
  const n = m.n;
  const d = m.d;
  const K = neighbors.k;
  const nb = neighbors.list;
  const tour = new Int32Array(n);
  const pos = new Int32Array(n);
  const queue = createPointQueue(n);
  const eps = gainEpsilon(m, neighbors);
  const moves3 = { twoOpt: moves.twoOpt, orOpt: moves.orOpt, lk: moves.lk === true };
  const lkBreadth = moves.lkBreadth ?? LK_BREADTH_NARROW;
  const or3 = moves.or3 === true;
  const or3Depth = moves.or3Depth ?? LK_DEPTH;

  // Undo log: while recording, every write to the circuit logs its position and old occupant.
  /** Length change since the last `load` or `mark`. */
  let acc = 0;
  let recording = false;
  let logPos = new Int32Array(0);
  let logVal = new Int32Array(0);
  let logN = 0;
  // Only a position's first write since `mark` is logged (its value then): rollback restores each
  // touched position once, however often a repair's tentative moves rewrote it.
  const stamp = new Int32Array(n);
  let epoch = 0;
  const put = (p: number, c: number): void => {
    if (recording && stamp[p] !== epoch) {
      stamp[p] = epoch;
      if (logN === logPos.length) {
        const a = new Int32Array(Math.max(1024, logN * 2));
        a.set(logPos);
        logPos = a;
        const b = new Int32Array(a.length);
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

  const push = queue.push;
  const succ = (c: number): number => tour[pos[c]! + 1 === n ? 0 : pos[c]! + 1]!;
  const pred = (c: number): number => tour[pos[c]! === 0 ? n - 1 : pos[c]! - 1]!;
  // Without penalties the plain lookup (the extra loads cost `local` on small trips about a third).
  const dist = comparisonOf(m, neighbors.pi);

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
      put(i, b);
      put(j, a);
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
        put((i0 + k) % n, tour[(i0 + L + k) % n]!);
      }
      start = (i0 + lenX) % n;
    } else {
      start = (i0 - lenY + n) % n;
      for (let k = lenY - 1; k >= 0; k--) {
        put((start + k + L) % n, tour[(start + k) % n]!);
      }
    }
    for (let k = 0; k < L; k++) {
      put((start + k) % n, segBuf[reversed ? L - 1 - k : k]!);
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
          acc += delta;
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
      acc += (reversed ? rev : fwd) - gain;
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

  // The chain's moves as 2-opt moves (a, b, c, d): edges (a, b) and (c, d) out, (a, c) and (b, d) in.
  const MOVES_MAX = 3 * LK_DEPTH;
  const mvA = new Int32Array(MOVES_MAX);
  const mvB = new Int32Array(MOVES_MAX);
  const mvC = new Int32Array(MOVES_MAX);
  const mvD = new Int32Array(MOVES_MAX);
  let mvN = 0;
  /**
   * The 2-opt move that takes out (a, b) and (c, d), where b follows a and d follows c in the same
   * sense, and puts in (a, c) and (b, d); logged so the chain can be undone.
   */
  const move2 = (a: number, b: number, c: number, d: number): void => {
    if (succ(a) === b) reversePath(b, c);
    else reversePath(a, d);
    mvA[mvN] = a;
    mvB[mvN] = b;
    mvC[mvN] = c;
    mvD[mvN] = d;
    mvN++;
  };
  /** Undoes the chain's moves back to `to` of them (each 2-opt move's inverse swaps b and c). */
  const undoTo = (to: number): void => {
    while (mvN > to) {
      mvN--;
      const a = mvA[mvN]!;
      const c = mvC[mvN]!;
      if (succ(a) === c) reversePath(c, mvB[mvN]!);
      else reversePath(a, mvD[mvN]!);
    }
  };
  /**
   * One level of the chain: the edge (t1, t2) is out, `gain` is what the chain has saved so far. Tries
   * new edges (t2, t3) with t3 among t2's nearest while the gain stays positive. With t4 the neighbour
   * of t3 on t2's side, the 2-opt move t2…t4 gives the circuit with (t2, t3) in and (t3, t4) out, closed
   * by (t4, t1). With t4 on the other side, closing would split the circuit, so a third edge (t4, t5),
   * t5 among t4's nearest between t2 and t3, and (t5, t6) out with t6 either neighbour of t5 make the
   * sequential 3-opt move (segment insertion, "or-3opt"), closed by (t6, t1).
   */
  const lkStep = (t1: number, t2: number, gain: number, depth: number): boolean => {
    const breadth = lkBreadth[depth] ?? 1;
    const mark0 = mvN;
    let tried = 0;
    for (let t = 0; t < K && tried < breadth; t++) {
      const t3 = nb[t2 * K + t]!;
      const g1 = gain - dist(t2, t3);
      if (!(g1 > eps)) break;
      if (t3 === t1) continue;
      // An undone chain may leave the array mirrored: the sense is read again for every candidate.
      const fwd = succ(t1) === t2;
      const t4 = fwd ? pred(t3) : succ(t3);
      if (t4 === t2 || t3 === t2) continue;
      tried++;
      const g2 = g1 + dist(t3, t4);
      const close = g2 - dist(t4, t1);
      // The last level only tests closing, and the level before it finds the last level's t4 without
      // making its flip (lastLevel); other levels need the flip made to find their t4.
      if (close <= eps && depth + 2 === LK_DEPTH) {
        if (lastLevel(t1, t2, t3, t4, g2, fwd)) return true;
      } else if (close > eps || depth + 1 < LK_DEPTH) {
        move2(t1, t2, t4, t3);
        if (close > eps) {
          acc -= close;
          return true;
        }
        if (lkStep(t1, t4, g2, depth + 1)) return true;
        undoTo(mark0);
      }
      if (or3 && depth < or3Depth && depth + 1 < LK_DEPTH && or3At(t1, t2, t3, g1, depth)) return true;
    }
    return false;
  };
  /**
   * The chain's last level as lkStep would try it after the flip move2(t1, t2, t4, t3), without making
   * the flip: after it the circuit runs t1 t4 … t2 t3 (the path t2…t4 reversed), so the point before x
   * in the chain's sense is t1 for t4, t2 for t3, the point after it for x on the path t2…t4 and the
   * point before it elsewhere. Makes both flips when the last level closes with a gain.
   */
  const lastLevel = (t1: number, t2: number, t3: number, t4: number, gain: number, fwd: boolean): boolean => {
    const breadth = lkBreadth[LK_DEPTH - 1] ?? 1;
    const p2 = pos[t2]!;
    let span = fwd ? pos[t4]! - p2 : p2 - pos[t4]!;
    if (span < 0) span += n;
    let tried = 0;
    for (let t = 0; t < K && tried < breadth; t++) {
      const u3 = nb[t4 * K + t]!;
      const g1 = gain - dist(t4, u3);
      if (!(g1 > eps)) break;
      if (u3 === t1 || u3 === t4) continue;
      let u4: number;
      if (u3 === t3) u4 = t2;
      else {
        let off = fwd ? pos[u3]! - p2 : p2 - pos[u3]!;
        if (off < 0) off += n;
        const onPath = off <= span;
        u4 = onPath === fwd ? succ(u3) : pred(u3);
      }
      if (u4 === t4) continue;
      tried++;
      const close = g1 + dist(u3, u4) - dist(u4, t1);
      if (close > eps) {
        move2(t1, t2, t4, t3);
        move2(t1, t4, u4, u3);
        acc -= close;
        return true;
      }
    }
    return false;
  };
  /** The or-3opt alternative of lkStep for t3 (t4 = t3's neighbour away from t2). */
  const or3At = (t1: number, t2: number, t3: number, g1: number, depth: number): boolean => {
    let fwd = succ(t1) === t2;
    const t4 = fwd ? succ(t3) : pred(t3);
    if (t4 === t1) return false;
    const g2 = g1 + dist(t3, t4);
    const mark0 = mvN;
    const breadth = lkBreadth[depth + 1] ?? 1;
    // t5 must lie on the path t2…t3: its offset from t2 (in the chain's sense) at most t3's. Read again
    // after an undo, which may leave the array mirrored.
    let p2 = pos[t2]!;
    let span = fwd ? pos[t3]! - p2 : p2 - pos[t3]!;
    if (span < 0) span += n;
    let tried = 0;
    for (let t = 0; t < K && tried < breadth; t++) {
      const t5 = nb[t4 * K + t]!;
      const g3 = g2 - dist(t4, t5);
      if (!(g3 > eps)) break;
      let off = fwd ? pos[t5]! - p2 : p2 - pos[t5]!;
      if (off < 0) off += n;
      if (t5 === t3 || t5 === t4 || off > span) continue;
      tried++;
      for (let side = 0; side < 2; side++) {
        // side 0: t6 follows t5 (towards t3); side 1: t6 precedes t5 (towards t2).
        if (side === 0 ? t5 === t3 : t5 === t2) continue;
        const t6 = side === 0 ? (fwd ? succ(t5) : pred(t5)) : fwd ? pred(t5) : succ(t5);
        const g4 = g3 + dist(t5, t6);
        const close = g4 - dist(t6, t1);
        if (!(close > eps) && depth + 2 >= LK_DEPTH) continue;
        if (side === 0) {
          // t1 t2…t5 t6…t3 t4 → t1 t6…t3 t2…t5 t4
          move2(t1, t2, t3, t4);
          move2(t1, t3, t6, t5);
          move2(t3, t5, t2, t4);
        } else {
          // t1 t2…t6 t5…t3 t4 → t1 t6…t2 t3…t5 t4
          move2(t1, t2, t6, t5);
          move2(t2, t5, t3, t4);
        }
        if (close > eps) {
          acc -= close;
          return true;
        }
        if (lkStep(t1, t6, g4, depth + 2)) return true;
        undoTo(mark0);
        fwd = succ(t1) === t2;
        p2 = pos[t2]!;
        span = fwd ? pos[t3]! - p2 : p2 - pos[t3]!;
        if (span < 0) span += n;
      }
    }
    return false;
  };
  /** Tries a Lin–Kernighan chain starting at either circuit edge of `a`; applies the first that gains. */
  const lkAt = (a: number): boolean => {
    for (let side = 0; side < 2; side++) {
      const t2 = side === 0 ? succ(a) : pred(a);
      mvN = 0;
      if (lkStep(a, t2, dist(a, t2), 0)) {
        for (let f = 0; f < mvN; f++) {
          push(mvA[f]!);
          push(mvB[f]!);
          push(mvC[f]!);
          push(mvD[f]!);
        }
        return true;
      }
    }
    return false;
  };

  /** Scans every 2-opt move, applying each improving one met on the way. O(n²). True when one applied. */
  const fullTwoOpt = (budget: Budget | undefined): boolean => {
    let found = false;
    for (let i = 0; i < n - 2; i++) {
      if ((i & 15) === 0 && budget?.expired()) return false;
      const a = tour[i]!;
      const b = tour[i + 1]!;
      const dab = dist(a, b);
      for (let j = i + 2; j < n; j++) {
        if (i === 0 && j === n - 1) continue;
        const c = tour[j]!;
        const e = tour[j + 1 === n ? 0 : j + 1]!;
        const delta = dist(a, c) + dist(b, e) - dab - dist(c, e);
        if (delta < -eps) {
          acc += delta;
          reversePath(b, c);
          push(a);
          push(b);
          push(c);
          push(e);
          found = true;
          break;
        }
      }
    }
    return found;
  };

  /** Scans every Or-opt move (segments of 1–3, both orientations, every edge), applying each improving one met. O(n²). */
  const fullOrOpt = (budget: Budget | undefined): boolean => {
    let found = false;
    for (let L = 1; L <= 3 && n - L >= 3; L++) {
      for (let i = 0; i < n; i++) {
        if ((i & 15) === 0 && budget?.expired()) return false;
        const s1 = tour[i]!;
        const s2 = tour[(i + L - 1) % n]!;
        const p = pred(s1);
        const nx = succ(s2);
        const gain = dist(p, s1) + dist(s2, nx) - dist(p, nx);
        for (let k = 0; k < n; k++) {
          if (tryInsert(s1, s2, L, gain, tour[k]!)) {
            found = true;
            break;
          }
        }
      }
    }
    return found;
  };

  const kicks = createKicks({ tour, dist, put, push });

  return {
    tour,
    load(order, active) {
      for (let i = 0; i < n; i++) {
        tour[i] = order[i]!;
        pos[order[i]!] = i;
      }
      queue.clear();
      acc = 0;
      if (active) for (let i = 0; i < active.length; i++) push(active[i]!);
      else for (let i = 0; i < n; i++) push(tour[i]!);
    },
    run(budget, full) {
      if (n < 4) return true;
      for (;;) {
        let steps = 0;
        while (queue.size() > 0) {
          if ((++steps & 63) === 0 && budget?.expired()) return false;
          const a = queue.pop();
          while ((moves3.twoOpt && twoOptAt(a)) || (moves3.orOpt && orOptAt(a)) || (moves3.lk && lkAt(a))) {
            if ((++steps & 63) === 0 && budget?.expired()) return false;
          }
        }
        if (!full || n > FULL_SCAN_MAX_POINTS) return true;
        if (budget?.expired()) return false;
        const found = (moves.twoOpt && fullTwoOpt(budget)) || (moves.orOpt && fullOrOpt(budget));
        if (!found) return !budget?.expired();
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
      if (++epoch === 0x7fffffff) {
        stamp.fill(0);
        epoch = 1;
      }
      acc = 0;
    },
    change() {
      return acc;
    },
    rollback() {
      recording = false;
      for (let k = logN - 1; k >= 0; k--) {
        const p = logPos[k]!;
        const c = logVal[k]!;
        tour[p] = c;
        pos[c] = p;
      }
      logN = 0;
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
  };
}

/**
 * Improves `order` to a local optimum of the chosen moves (default 2-opt and Or-opt): no 2-opt move
 * and no move of a 1–3 point segment shortens it by more than 1e-9 of the longest distance.
 * Typical cost near O(n·K) per pass with K = 10 neighbours plus an O(n²) closing scan. When `budget`
 * expires first, the circuit reached so far is returned (never longer than the input).
 * Returns the circuit in tour order from an arbitrary point; `canonicalize` rotates it to the depot.
 */
export function improveLocal(m: DistanceMatrix, order: ArrayLike<number>, budget?: Budget, moves: LocalMoves = BOTH, neighbors?: Neighbors): number[] {
  if (m.n < 4) return Array.from(order);
  const ls = createLocalSearch(m, moves, neighbors);
  ls.load(order);
  ls.run(budget, true);
  return Array.from(ls.tour);
}
