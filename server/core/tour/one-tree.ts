/**
 * The minimum 1-tree of a dense distance matrix under node penalties π (M. Held & R. M. Karp, "The
 * traveling-salesman problem and minimum spanning trees", Operations Research 18(6), 1970): a minimum
 * spanning tree of every point but `special` (Prim, O(n²) on the dense matrix), plus `special` joined by
 * its two cheapest penalised edges. Edge weights are d(i, j) + π(i) + π(j). Used by the lower bound
 * (`bound.ts`) and the α-nearness candidate lists (`alpha.ts`).
 */
import type { DistanceMatrix } from '../matrix';

export interface OneTree {
  /** The penalties: set them, then `build()`. */
  readonly pi: Float64Array;
  /** Each point's degree in the last tree built. */
  readonly deg: Int32Array;
  /** Each point's parent in the spanning tree; −1 for its root and for `special`. */
  readonly parent: Int32Array;
  /** Every point but `special` in the order it joined the spanning tree: a parent before its children. */
  readonly order: Int32Array;
  /** `special`'s two cheapest neighbours under π (`a` the cheaper, lowest index on ties) and their weights. */
  readonly ends: { a: number; b: number; wa: number; wb: number };
  /** Builds the tree under the current π; returns its penalised weight minus 2Σπ (−∞ when a point cannot be reached). */
  build(): number;
}

export function createOneTree(m: DistanceMatrix, special = 0): OneTree {
  const n = m.n;
  const d = m.d;
  const pi = new Float64Array(n);
  const deg = new Int32Array(n);
  const parent = new Int32Array(n);
  const order = new Int32Array(Math.max(0, n - 1));
  const key = new Float64Array(n);
  const inTree = new Uint8Array(n);
  const ends = { a: -1, b: -1, wa: Infinity, wb: Infinity };
  const root = special === 0 ? 1 : 0;

  const build = (): number => {
    deg.fill(0);
    inTree.fill(0);
    key.fill(Infinity);
    parent.fill(-1);
    key[root] = 0;
    let total = 0;
    for (let step = 0; step < n - 1; step++) {
      let u = -1;
      let best = Infinity;
      for (let v = 0; v < n; v++) {
        if (v !== special && inTree[v] === 0 && key[v]! < best) {
          best = key[v]!;
          u = v;
        }
      }
      if (u < 0) return -Infinity;
      inTree[u] = 1;
      order[step] = u;
      total += best;
      if (parent[u]! >= 0) {
        deg[u]!++;
        deg[parent[u]!]!++;
      }
      const row = u * n;
      const pu = pi[u]!;
      for (let v = 0; v < n; v++) {
        if (v === special || inTree[v] === 1) continue;
        const w = d[row + v]! + pu + pi[v]!;
        if (w < key[v]!) {
          key[v] = w;
          parent[v] = u;
        }
      }
    }
    ends.a = -1;
    ends.b = -1;
    ends.wa = Infinity;
    ends.wb = Infinity;
    const row = special * n;
    for (let v = 0; v < n; v++) {
      if (v === special) continue;
      const w = d[row + v]! + pi[special]! + pi[v]!;
      if (w < ends.wa) {
        ends.b = ends.a;
        ends.wb = ends.wa;
        ends.a = v;
        ends.wa = w;
      } else if (w < ends.wb) {
        ends.b = v;
        ends.wb = w;
      }
    }
    if (ends.b < 0) return -Infinity;
    total += ends.wa + ends.wb;
    deg[special] = 2;
    deg[ends.a]!++;
    deg[ends.b]!++;
    let sumPi = 0;
    for (let v = 0; v < n; v++) sumPi += pi[v]!;
    return total - 2 * sumPi;
  };

  return { pi, deg, parent, order, ends, build };
}
