/**
 * Walking distances among the access points of one wave, and the route-length estimate batching
 * compares batches by: the tour engine's nearest-neighbor construction (O(k²) for k stops), the
 * fast construction, since batching evaluates thousands of candidate batches.
 */

/** A dense table up to this many points (2,048² × 8 B = 32 MiB); above it, distances come from the callback. */
const DENSE_MAX_POINTS = 2048;

/**
 * The depot (local id 0) and every distinct access point of the wave (local ids 1…), with their
 * walking distances in metres.
 */
export class NodeTable {
  /** Global node id of each local id; `nodes[0]` is the depot. */
  readonly nodes: Int32Array;
  readonly size: number;
  private readonly local = new Map<number, number>();
  private readonly dense: Float64Array | null;
  private readonly distance: (a: number, b: number) => number;
  /** Scratch reused by every `routeLength` call. */
  private ids = new Int32Array(64);
  private visited = new Uint8Array(64);
  private order = new Int32Array(64);

  constructor(depotNode: number, nodes: Iterable<number>, distance: (a: number, b: number) => number) {
    const list = [depotNode];
    this.local.set(depotNode, 0);
    const rest = [...new Set(nodes)].filter((v) => v !== depotNode).sort((a, b) => a - b);
    for (const v of rest) {
      this.local.set(v, list.length);
      list.push(v);
    }
    this.nodes = Int32Array.from(list);
    this.size = list.length;
    this.distance = distance;
    const n = this.size;
    if (n <= DENSE_MAX_POINTS) {
      const d = new Float64Array(n * n);
      for (let i = 0; i < n; i++) {
        for (let j = i + 1; j < n; j++) {
          const v = distance(list[i]!, list[j]!);
          d[i * n + j] = v;
          d[j * n + i] = v;
        }
      }
      this.dense = d;
    } else {
      this.dense = null;
    }
  }

  /** Local id of a global node id; -1 when the node is not in the table. */
  localOf(node: number): number {
    return this.local.get(node) ?? -1;
  }

  /** Metres between local ids i and j. O(1). */
  d(i: number, j: number): number {
    if (this.dense) return this.dense[i * this.size + j]!;
    return i === j ? 0 : this.distance(this.nodes[i]!, this.nodes[j]!);
  }

  /**
   * Length in metres of the nearest-neighbor circuit from the depot through the local ids `stops`
   * (ascending, the depot itself excluded) and back. 0 for no stops. O(k²).
   *
   * The same circuit and the same sum as the tour engine's nearest neighbor (`solveTour` with
   * `nearest-neighbor`, ../tour/construct.ts) on the matrix of the depot and `stops`: ties to the
   * lowest index, the circuit summed in its canonical direction (../tour/circuit.ts); computed on the
   * table directly, without building that matrix, since batching evaluates tens of thousands of them.
   */
  routeLength(stops: ArrayLike<number>): number {
    const k = stops.length;
    if (k === 0) return 0;
    const n = k + 1;
    if (this.ids.length < n) {
      this.ids = new Int32Array(2 * n);
      this.visited = new Uint8Array(2 * n);
      this.order = new Int32Array(2 * n);
    }
    // Matrix indices: 0 the depot, i the stop stops[i − 1]; an entry is read with the lower index
    // first, as the matrix was built (the dense table is symmetric, so only the callback cares).
    const ids = this.ids;
    const visited = this.visited;
    const order = this.order;
    const dense = this.dense;
    const size = this.size;
    ids[0] = 0;
    for (let i = 1; i < n; i++) ids[i] = stops[i - 1]!;
    visited.fill(0, 0, n);
    visited[0] = 1;
    order[0] = 0;
    let cur = 0;
    for (let step = 1; step < n; step++) {
      let next = -1;
      let bestLen = Infinity;
      const row = ids[cur]! * size;
      for (let j = 1; j < n; j++) {
        if (visited[j] !== 0) continue;
        const v = dense ? dense[row + ids[j]!]! : cur < j ? this.d(ids[cur]!, ids[j]!) : this.d(ids[j]!, ids[cur]!);
        if (v < bestLen) {
          bestLen = v;
          next = j;
        }
      }
      if (next < 0) for (next = 1; visited[next] === 1; next++);
      visited[next] = 1;
      order[step] = next;
      cur = next;
    }
    // Summed in the canonical direction: the first stop's index below the last's.
    const reverse = k > 1 && order[1]! > order[k]!;
    let sum = 0;
    let prev = 0;
    for (let i = 1; i <= n; i++) {
      const at = i === n ? 0 : reverse ? order[n - i]! : order[i]!;
      sum += dense ? dense[ids[prev]! * size + ids[at]!]! : prev < at ? this.d(ids[prev]!, ids[at]!) : this.d(ids[at]!, ids[prev]!);
      prev = at;
    }
    return sum;
  }
}

/**
 * Closeness of two orders: the sum over each one's stops of the walk to the other's nearest stop,
 * both ways. O(|a| · |b|) table reads.
 */
export function closeness(table: NodeTable, a: Int32Array, b: Int32Array): number {
  return oneWay(table, a, b) + oneWay(table, b, a);
}

function oneWay(table: NodeTable, from: Int32Array, to: Int32Array): number {
  let sum = 0;
  for (let i = 0; i < from.length; i++) {
    const s = from[i]!;
    let best = Infinity;
    for (let j = 0; j < to.length; j++) {
      const v = table.d(s, to[j]!);
      if (v < best) best = v;
    }
    sum += best;
  }
  return sum;
}

/** Union of two ascending arrays of distinct ids, ascending. O(|a| + |b|). */
export function unionSorted(a: Int32Array, b: Int32Array): Int32Array {
  const out = new Int32Array(a.length + b.length);
  const k = unionInto(a, b, out);
  return k === out.length ? out : out.slice(0, k);
}

/** Writes the union of two ascending arrays of distinct ids into `out` (room for |a| + |b|), ascending; returns its length. */
export function unionInto(a: Int32Array, b: Int32Array, out: Int32Array): number {
  let i = 0;
  let j = 0;
  let k = 0;
  while (i < a.length && j < b.length) {
    const x = a[i]!;
    const y = b[j]!;
    if (x < y) {
      out[k++] = x;
      i++;
    } else if (y < x) {
      out[k++] = y;
      j++;
    } else {
      out[k++] = x;
      i++;
      j++;
    }
  }
  while (i < a.length) out[k++] = a[i++]!;
  while (j < b.length) out[k++] = b[j++]!;
  return k;
}
