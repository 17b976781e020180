/**
 * Walking distances among the access points of one wave, and the route-length estimate batching
 * compares batches by: the tour engine's nearest-neighbor construction (O(k²) for k stops), the
 * fast construction, since batching evaluates thousands of candidate batches.
 */
import { matrixOf } from '../matrix';
import { solveTour } from '../tour/index';

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
  /** Scratch matrix reused by every `routeLength` call: batching evaluates tens of thousands of them. */
  private scratch = new Float64Array(64 * 64);

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
   * (the depot itself excluded) and back. 0 for no stops. O(k²).
   */
  routeLength(stops: ArrayLike<number>): number {
    const k = stops.length + 1;
    if (k === 1) return 0;
    if (this.scratch.length < k * k) this.scratch = new Float64Array(k * k * 2);
    const d = this.scratch.subarray(0, k * k);
    d[0] = 0;
    for (let i = 1; i < k; i++) {
      const a = stops[i - 1]!;
      const v = this.d(0, a);
      d[i] = v;
      d[i * k] = v;
      d[i * k + i] = 0;
      for (let j = i + 1; j < k; j++) {
        const w = this.d(a, stops[j - 1]!);
        d[i * k + j] = w;
        d[j * k + i] = w;
      }
    }
    return solveTour(matrixOf(k, d), { method: 'nearest-neighbor', improve: 'none', timeLimitMs: Infinity }).length;
  }
}

/** Union of two ascending arrays of distinct ids, ascending. O(|a| + |b|). */
export function unionSorted(a: Int32Array, b: Int32Array): Int32Array {
  const out = new Int32Array(a.length + b.length);
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
  return k === out.length ? out : out.slice(0, k);
}
