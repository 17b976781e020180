/**
 * Circuit constructions: nearest neighbor, repeated nearest neighbor and sorted edges (greedy edge).
 * Ties always go to the lowest point index (for edges: lower length, then lower first end, then lower
 * second end), so a matrix gives one answer. Each returns an order starting at the depot.
 */
import type { DistanceMatrix } from '../matrix';
import { circuitLength } from '../matrix';
import type { Budget } from './budget';
import { canonicalize } from './circuit';
import type { Neighbors } from './local';
import { DEFAULT_NEIGHBORS, neighborLists } from './local';
import { createDisjointSets } from './disjoint-sets';

/**
 * Nearest neighbor from `start`: always walk to the closest unvisited point, then back.
 * O(n²) time, O(n) memory; with `neighbors` most steps read only the K-list (O(n·K) typical), falling
 * back to a full row scan when every listed neighbour is visited. The lists hold the first K points in
 * (distance, index) order, so both paths pick the same point. Returns the order beginning at `start`.
 */
export function nearestNeighbor(m: DistanceMatrix, start: number, neighbors?: Neighbors): number[] {
  const n = m.n;
  const d = m.d;
  const visited = new Uint8Array(n);
  const order = new Array<number>(n);
  const K = neighbors ? neighbors.k : 0;
  const nb = neighbors ? neighbors.list : undefined;
  let cur = start;
  visited[cur] = 1;
  order[0] = cur;
  for (let step = 1; step < n; step++) {
    let next = -1;
    if (nb) {
      for (let t = cur * K, end = t + K; t < end; t++) {
        if (visited[nb[t]!] === 0) {
          next = nb[t]!;
          break;
        }
      }
    }
    if (next < 0) {
      const row = cur * n;
      let bestLen = Infinity;
      for (let j = 0; j < n; j++) {
        if (visited[j] === 0 && d[row + j]! < bestLen) {
          bestLen = d[row + j]!;
          next = j;
        }
      }
    }
    // Only reachable with non-finite entries; keep the order a permutation regardless.
    if (next < 0) for (next = 0; visited[next] === 1; next++);
    visited[next] = 1;
    order[step] = next;
    cur = next;
  }
  return order;
}

/**
 * Repeated nearest neighbor: nearest neighbor from every point, each circuit rotated to start at the
 * depot, the shortest kept (the depot's own run first, then starts in index order; a later run must be
 * strictly shorter to replace it, so the result is never longer than nearest neighbor from the depot).
 * O(n³) worst case, about O(n²·K) with neighbour lists. When `budget` expires, the best circuit found so far is returned (at least the depot's run).
 */
export function repeatedNearestNeighbor(
  m: DistanceMatrix,
  depot: number,
  budget?: Budget,
  neighbors: Neighbors = neighborLists(m, DEFAULT_NEIGHBORS),
): number[] {
  let best = nearestNeighbor(m, depot, neighbors);
  let bestLen = circuitLength(m, best);
  for (let s = 0; s < m.n; s++) {
    if (s === depot) continue;
    if (budget && budget.expired()) break;
    const order = nearestNeighbor(m, s, neighbors);
    const len = circuitLength(m, order);
    if (len < bestLen) {
      best = order;
      bestLen = len;
    }
  }
  return canonicalize(best, depot);
}

/** Up to this many points sorted edges takes every pair; above it, pairs from neighbour lists. */
export const SORTED_EDGES_ALL_PAIRS_MAX = 128;
/** Neighbours per point whose edges the large-instance greedy considers (common practice: 10–20). */
export const GREEDY_NEIGHBORS = 16;

/**
 * Sorted edges (greedy edge): take edges cheapest first, skipping any that would give a point degree 3
 * or close a circuit before every point is in (union–find), then close the path's two ends.
 * Up to SORTED_EDGES_ALL_PAIRS_MAX points every pair is a candidate (O(n² log n) time and memory).
 * Above it the candidates are each point's GREEDY_NEIGHBORS nearest (O(n·K log(n·K)) once the lists
 * exist), the fragments left are joined end to nearest free end (O(F²) for F fragments), and `budget`
 * is checked inside both loops: when it expires the remaining fragments are joined in index order.
 */
export function sortedEdges(m: DistanceMatrix, depot: number, budget?: Budget, neighbors?: Neighbors): number[] {
  const n = m.n;
  if (n <= 3)
    return canonicalize(
      Array.from({ length: n }, (_, i) => i),
      depot,
    );
  const d = m.d;
  let ea: Uint32Array;
  let eb: Uint32Array;
  let w: Float64Array;
  let count: number;
  if (n <= SORTED_EDGES_ALL_PAIRS_MAX) {
    count = (n * (n - 1)) / 2;
    ea = new Uint32Array(count);
    eb = new Uint32Array(count);
    w = new Float64Array(count);
    let e = 0;
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        ea[e] = i;
        eb[e] = j;
        w[e] = d[i * n + j]!;
        e++;
      }
    }
  } else {
    const nb = neighbors && neighbors.k >= GREEDY_NEIGHBORS ? neighbors : neighborLists(m, GREEDY_NEIGHBORS);
    const K = nb.k;
    const list = nb.list;
    const inList = (a: number, b: number): boolean => {
      for (let t = a * K, end = t + K; t < end; t++) if (list[t] === b) return true;
      return false;
    };
    ea = new Uint32Array(n * K);
    eb = new Uint32Array(n * K);
    w = new Float64Array(n * K);
    let e = 0;
    for (let i = 0; i < n; i++) {
      for (let t = i * K, end = t + K; t < end; t++) {
        const j = list[t]!;
        // Each pair once, first end lower: (i, j) from i's list, or from j's when i is not on it.
        if (j > i || !inList(j, i)) {
          ea[e] = Math.min(i, j);
          eb[e] = Math.max(i, j);
          w[e] = d[i * n + j]!;
          e++;
        }
      }
    }
    count = e;
  }
  // Ties: lower length, then lower first end, then lower second end.
  const idx = new Uint32Array(count);
  for (let k = 0; k < count; k++) idx[k] = k;
  // All pairs are generated in (first end, second end) order, so there the index breaks ties.
  const sorted =
    n <= SORTED_EDGES_ALL_PAIRS_MAX ? idx.sort((x, y) => w[x]! - w[y]! || x - y) : idx.sort((x, y) => w[x]! - w[y]! || ea[x]! - ea[y]! || eb[x]! - eb[y]!);

  const { find, union } = createDisjointSets(n);
  const deg = new Uint8Array(n);
  // Two adjacency slots per point; -1 is empty.
  const adj = new Int32Array(2 * n).fill(-1);
  let taken = 0;
  const link = (a: number, b: number): void => {
    union(a, b);
    adj[2 * a + deg[a]!] = b;
    adj[2 * b + deg[b]!] = a;
    deg[a]!++;
    deg[b]!++;
    taken++;
  };
  for (let k = 0; k < count && taken < n - 1; k++) {
    if ((k & 1023) === 1023 && budget?.expired()) break;
    const a = ea[sorted[k]!]!;
    const b = eb[sorted[k]!]!;
    if (deg[a] === 2 || deg[b] === 2) continue;
    if (find(a) === find(b)) continue;
    link(a, b);
  }
  if (taken < n - 1) {
    // Fragments (paths, single points included) joined end to nearest free end of another fragment.
    const otherEnd = (x: number): number => {
      if (deg[x] === 0) return x;
      let prev = x;
      let cur = adj[2 * x]!;
      while (deg[cur] === 2) {
        const next = adj[2 * cur] !== prev ? adj[2 * cur]! : adj[2 * cur + 1]!;
        prev = cur;
        cur = next;
      }
      return cur;
    };
    const ends: number[] = [];
    for (let i = 0; i < n; i++) if (deg[i]! < 2) ends.push(i);
    const used = new Uint8Array(n);
    let cur = otherEnd(ends[0]!);
    used[ends[0]!] = 1;
    used[cur] = 1;
    let late = false;
    while (taken < n - 1) {
      late ||= budget?.expired() ?? false;
      let best = -1;
      let bestLen = Infinity;
      for (const x of ends) {
        if (used[x]) continue;
        if (late) {
          best = x;
          break;
        }
        const v = d[cur * n + x]!;
        if (v < bestLen) {
          bestLen = v;
          best = x;
        }
      }
      const far = otherEnd(best);
      used[best] = 1;
      used[far] = 1;
      link(cur, best);
      cur = far;
    }
  }
  // n − 1 edges without a cycle or degree 3 form one Hamiltonian path; walk it from one end.
  let startPt = 0;
  while (deg[startPt] !== 1) startPt++;
  const order = new Array<number>(n);
  let prev = -1;
  let cur = startPt;
  for (let step = 0; step < n; step++) {
    order[step] = cur;
    const next = adj[2 * cur] !== prev ? adj[2 * cur]! : adj[2 * cur + 1]!;
    prev = cur;
    cur = next;
  }
  return canonicalize(order, depot);
}
