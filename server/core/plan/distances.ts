/**
 * Exact all-pairs shortest walking distances on a walk graph, stored in O(V + H²) and answered in O(1).
 *
 * Hubs are the nodes of degree ≠ 2, the depots and the junctions. Every other node lies on a chain of
 * degree-2 nodes between two hubs (its anchors), at a known offset from each. A shortest path between
 * two nodes either stays on their shared chain or leaves each node's chain through one of its anchors,
 * so d(u, v) = min(direct along the chain, min over anchor pairs of offset + D(hub, hub) + offset).
 * D is the hub×hub matrix from one Dijkstra per hub (Dijkstra 1959, Numer. Math. 1) on the contracted
 * graph whose edges are the chains. In a parallel-aisle plan hubs are the aisle/cross-aisle junctions,
 * so H stays in the hundreds while access points run into the tens of thousands.
 */
import type { Clock } from '../clock';
import type { DistanceMatrix } from '../matrix';
import { matrixFromFunction } from '../matrix';
import { MinHeap } from './heap';
import type { WalkGraph } from './walk-graph';
import { NODE_DEPOT, NODE_JUNCTION } from './walk-graph';

export interface DistanceIndex {
  readonly nodeCount: number;
  readonly hubCount: number;
  /** Node id of each hub. */
  readonly hubNode: Int32Array;
  /** Hub×hub shortest distances in metres, row-major; Infinity where no path. */
  readonly hubDist: Float64Array;
  /** Two anchors per node, `anchorHub[2u]` and `anchorHub[2u + 1]` (hub indices, -1 for none). A hub is its own single anchor. */
  readonly anchorHub: Int32Array;
  /** Walking distance in metres from node u to each anchor along its chain, parallel to `anchorHub`. */
  readonly anchorDist: Float64Array;
  /** Chain id of each non-hub node; -1 for hubs. Nodes on one chain are measured from the same first anchor. */
  readonly chain: Int32Array;
}

export interface DistanceIndexOptions {
  /** Abort with a `DistanceBudgetError` once this many milliseconds of `clock` have passed. */
  budgetMs?: number;
  clock?: Clock;
  /** Refuse plans whose hub matrix would exceed this many hubs (H² × 8 bytes); default 4,000 (128 MB). */
  maxHubs?: number;
}

/** Thrown when the index would exceed its time budget or its hub limit. */
export class DistanceBudgetError extends Error {
  readonly code: 'budget_exceeded' | 'too_many_hubs';
  constructor(code: 'budget_exceeded' | 'too_many_hubs', message: string) {
    super(message);
    this.name = 'DistanceBudgetError';
    this.code = code;
  }
}

/**
 * Builds the distance index of `graph`. Exact (same sums as any shortest-path search, up to
 * floating-point rounding of about 1e-12 relative). O(V + H·(H + K) log H) time for H hubs and
 * K chains, O(V + H²) memory. Throws `DistanceBudgetError` past `options.budgetMs` or `options.maxHubs`.
 */
export function buildDistanceIndex(graph: WalkGraph, options: DistanceIndexOptions = {}): DistanceIndex {
  const { offsets, targets, lengths, kind } = graph;
  const n = graph.nodeCount;
  const maxHubs = options.maxHubs ?? 4000;
  const clock = options.clock;
  const deadline = clock && options.budgetMs !== undefined ? clock() + options.budgetMs : Infinity;

  const hubIndex = new Int32Array(n).fill(-1);
  const hubs: number[] = [];
  for (let u = 0; u < n; u++) {
    const deg = offsets[u + 1]! - offsets[u]!;
    if (deg !== 2 || kind[u]! & (NODE_DEPOT | NODE_JUNCTION)) {
      hubIndex[u] = hubs.length;
      hubs.push(u);
    }
  }

  const anchorHub = new Int32Array(2 * n).fill(-1);
  const anchorDist = new Float64Array(2 * n);
  const chain = new Int32Array(n).fill(-1);
  const chainA: number[] = [];
  const chainB: number[] = [];
  const chainLen: number[] = [];
  // Contracted graph edges (hub index pairs); chains and hub–hub edges alike.
  const cu: number[] = [];
  const cv: number[] = [];
  const cw: number[] = [];

  const walkChains = (h: number): void => {
    for (let k = offsets[h]!; k < offsets[h + 1]!; k++) {
      const first = targets[k]!;
      if (hubIndex[first]! >= 0) {
        if (h < first) {
          cu.push(hubIndex[h]!);
          cv.push(hubIndex[first]!);
          cw.push(lengths[k]!);
        }
        continue;
      }
      if (chain[first]! >= 0) continue;
      const id = chainA.length;
      const members: number[] = [];
      let prev = h;
      let cur = first;
      let cum = lengths[k]!;
      while (hubIndex[cur]! < 0) {
        chain[cur] = id;
        anchorDist[2 * cur] = cum;
        members.push(cur);
        // Degree 2: step over the edge that does not lead back.
        const e0 = offsets[cur]!;
        const next = targets[e0]! === prev ? e0 + 1 : e0;
        prev = cur;
        cum += lengths[next]!;
        cur = targets[next]!;
      }
      const ha = hubIndex[h]!;
      const hb = hubIndex[cur]!;
      for (const m of members) {
        anchorHub[2 * m] = ha;
        anchorHub[2 * m + 1] = hb;
        anchorDist[2 * m + 1] = cum - anchorDist[2 * m]!;
      }
      chainA.push(ha);
      chainB.push(hb);
      chainLen.push(cum);
      if (ha !== hb) {
        cu.push(ha);
        cv.push(hb);
        cw.push(cum);
      }
    }
  };

  for (let i = 0; i < hubs.length; i++) walkChains(hubs[i]!);
  // A ring of degree-2 nodes meets no hub; promote its first node so it gets a chain too.
  for (let u = 0; u < n; u++) {
    if (hubIndex[u]! < 0 && chain[u]! < 0) {
      hubIndex[u] = hubs.length;
      hubs.push(u);
      walkChains(u);
    }
  }
  for (let i = 0; i < hubs.length; i++) {
    anchorHub[2 * hubs[i]!] = i;
    anchorDist[2 * hubs[i]!] = 0;
  }

  const H = hubs.length;
  if (H > maxHubs) {
    throw new DistanceBudgetError('too_many_hubs', `plan has ${H} hubs; the distance index allows ${maxHubs}`);
  }

  const coff = new Int32Array(H + 1);
  for (let e = 0; e < cu.length; e++) {
    coff[cu[e]! + 1]!++;
    coff[cv[e]! + 1]!++;
  }
  for (let i = 0; i < H; i++) coff[i + 1]! += coff[i]!;
  const cfill = coff.slice(0, H);
  const ctgt = new Int32Array(2 * cu.length);
  const clen = new Float64Array(2 * cu.length);
  for (let e = 0; e < cu.length; e++) {
    ctgt[cfill[cu[e]!]!] = cv[e]!;
    clen[cfill[cu[e]!]!++] = cw[e]!;
    ctgt[cfill[cv[e]!]!] = cu[e]!;
    clen[cfill[cv[e]!]!++] = cw[e]!;
  }

  const hubDist = new Float64Array(H * H).fill(Infinity);
  const heap = new MinHeap(2 * cu.length + H + 1);
  for (let s = 0; s < H; s++) {
    if (clock && clock() > deadline) {
      throw new DistanceBudgetError('budget_exceeded', `distance index exceeded its ${options.budgetMs} ms budget after ${s} of ${H} hubs`);
    }
    const row = hubDist.subarray(s * H, (s + 1) * H);
    dijkstraInto(coff, ctgt, clen, s, row, heap, null, -1);
  }
  // Both directions are valid walk lengths; keep one value so d(a, b) = d(b, a) bit for bit.
  for (let i = 0; i < H; i++) {
    for (let j = i + 1; j < H; j++) {
      const v = Math.min(hubDist[i * H + j]!, hubDist[j * H + i]!);
      hubDist[i * H + j] = v;
      hubDist[j * H + i] = v;
    }
  }

  return { nodeCount: n, hubCount: H, hubNode: Int32Array.from(hubs), hubDist, anchorHub, anchorDist, chain };
}

/**
 * Shortest walking distance in metres between nodes a and b; Infinity when no path joins them.
 * O(1): at most four hub-matrix reads.
 */
export function pairDistance(index: DistanceIndex, a: number, b: number): number {
  if (a === b) return 0;
  // One summation order for both directions keeps d(a, b) = d(b, a) bit for bit.
  if (a > b) [a, b] = [b, a];
  const { anchorHub, anchorDist, hubDist, chain } = index;
  const H = index.hubCount;
  let best = Infinity;
  const ca = chain[a]!;
  if (ca >= 0 && ca === chain[b]) best = Math.abs(anchorDist[2 * a]! - anchorDist[2 * b]!);
  for (let i = 0; i < 2; i++) {
    const ha = anchorHub[2 * a + i]!;
    if (ha < 0) continue;
    const da = anchorDist[2 * a + i]!;
    const row = ha * H;
    for (let j = 0; j < 2; j++) {
      const hb = anchorHub[2 * b + j]!;
      if (hb < 0) continue;
      const d = da + hubDist[row + hb]! + anchorDist[2 * b + j]!;
      if (d < best) best = d;
    }
  }
  return best;
}

/**
 * Distance matrix over `nodes` (node ids; put the depot first for a trip): entry [i][j] is
 * `pairDistance(nodes[i], nodes[j])`, Infinity where no path. O(k²) for k nodes.
 */
export function tripMatrix(index: DistanceIndex, nodes: ArrayLike<number>): DistanceMatrix {
  return matrixFromFunction(nodes.length, (i, j) => pairDistance(index, nodes[i]!, nodes[j]!));
}

/**
 * Node sequence of one shortest walk from a to b (both ends included), or null when no path.
 * With `index` (built from this graph) it walks downhill on the stored distances: from each node it
 * steps to the neighbour v minimising edge + d(v, b), O(path length × degree). Without it, Dijkstra
 * with early exit, O(E log E). Ties go to the smaller node id, so the route drawn is the same on
 * every call.
 */
export function shortestPath(graph: WalkGraph, a: number, b: number, index?: DistanceIndex): Int32Array | null {
  const n = graph.nodeCount;
  if (a < 0 || b < 0 || a >= n || b >= n) return null;
  if (a === b) return Int32Array.of(a);
  if (index) {
    if (pairDistance(index, a, b) === Infinity) return null;
    const path = descend(graph, index, a, b);
    if (path) return path;
  }
  const dist = new Float64Array(n).fill(Infinity);
  const prev = new Int32Array(n).fill(-1);
  dijkstraInto(graph.offsets, graph.targets, graph.lengths, a, dist, new MinHeap(graph.targets.length + 1), prev, b);
  if (dist[b] === Infinity) return null;
  let len = 1;
  for (let u = b; u !== a; u = prev[u]!) len++;
  const path = new Int32Array(len);
  for (let u = b, i = len - 1; i >= 0; u = prev[u]!, i--) path[i] = u;
  return path;
}

/** Greedy descent on the index; null if it fails to arrive within n steps (zero-length edges can make it circle). */
function descend(graph: WalkGraph, index: DistanceIndex, a: number, b: number): Int32Array | null {
  const { offsets, targets, lengths } = graph;
  const out: number[] = [a];
  let prev = -1;
  let u = a;
  while (u !== b) {
    if (out.length > graph.nodeCount) return null;
    let best = Infinity;
    let next = -1;
    for (let k = offsets[u]!; k < offsets[u + 1]!; k++) {
      const v = targets[k]!;
      if (v === prev) continue;
      const d = lengths[k]! + pairDistance(index, v, b);
      if (d < best || (d === best && v < next)) {
        best = d;
        next = v;
      }
    }
    if (next < 0) return null;
    prev = u;
    u = next;
    out.push(u);
  }
  return Int32Array.from(out);
}

/**
 * Expands a circuit of node ids into the polyline a picker walks: interleaved x, y in metres along
 * each leg's shortest path, back to the first node when `closed`. Null when some leg has no path.
 * Pass the graph's `index` for O(path) legs instead of one Dijkstra per leg.
 */
export function circuitPolyline(graph: WalkGraph, circuit: ArrayLike<number>, closed = true, index?: DistanceIndex): Float64Array | null {
  const k = circuit.length;
  if (k === 0) return new Float64Array(0);
  const pts: number[] = [graph.x[circuit[0]!]!, graph.y[circuit[0]!]!];
  const legs = closed && k > 1 ? k : k - 1;
  for (let i = 0; i < legs; i++) {
    const path = shortestPath(graph, circuit[i]!, circuit[(i + 1) % k]!, index);
    if (!path) return null;
    for (let p = 1; p < path.length; p++) pts.push(graph.x[path[p]!]!, graph.y[path[p]!]!);
  }
  return Float64Array.from(pts);
}

/** Dijkstra from `source` over CSR arrays into `dist` (pre-filled with Infinity); stops once `target` settles. */
function dijkstraInto(
  offsets: Int32Array,
  targets: Int32Array,
  lengths: Float64Array,
  source: number,
  dist: Float64Array,
  heap: MinHeap,
  prev: Int32Array | null,
  target: number,
): void {
  heap.clear();
  dist[source] = 0;
  heap.push(0, source);
  while (heap.size > 0) {
    const d = heap.peekKey();
    const u = heap.pop();
    if (d > dist[u]!) continue;
    if (u === target) return;
    for (let k = offsets[u]!; k < offsets[u + 1]!; k++) {
      const v = targets[k]!;
      const nd = d + lengths[k]!;
      if (nd < dist[v]!) {
        dist[v] = nd;
        if (prev) prev[v] = u;
        heap.push(nd, v);
      }
    }
  }
}
