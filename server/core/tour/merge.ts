/**
 * Partition crossover of two circuits (D. Whitley, D. Hains & A. Howe, "Tunneling between optima:
 * partition crossover for the traveling salesman problem", GECCO 2009; the feasibility test on portal
 * pairs as R. Tinós, D. Whitley & G. Ochoa, Evolutionary Computation 26(3), 2018, describe it): the
 * edges the two circuits do not share fall apart into connected components; where, inside a component,
 * both circuits' own edges join the same pairs of entry points, either circuit's edges can be used
 * there without breaking the circuit, so each such component takes the shorter of the two. The child
 * is never longer than the shorter parent, and usually shorter than both when the parents are good
 * circuits from different searches. O(n).
 */
import type { DistanceMatrix } from '../matrix';
import { neighboursOf } from './circuit';
import { createDisjointSets } from './disjoint-sets';

export interface MergeResult {
  /** The child circuit, from point 0. */
  order: number[];
  /** Its length, metres. */
  length: number;
  /** Components where the two parents could be exchanged. */
  components: number;
}

/**
 * The partition-crossover child of circuits `a` and `b` (both through every point of `m` once).
 * Returns the shorter parent's circuit unchanged (from point 0) when no component can be exchanged.
 */
export function mergeCircuits(m: DistanceMatrix, a: ArrayLike<number>, b: ArrayLike<number>): MergeResult {
  const n = m.n;
  const d = m.d;
  const lenOf = (nb: Int32Array): number => {
    let s = 0;
    for (let v = 0; v < n; v++) s += d[v * n + nb[2 * v]!]! + d[v * n + nb[2 * v + 1]!]!;
    return s / 2;
  };
  if (n < 5) {
    const na = neighboursOf(a, n);
    const nbb = neighboursOf(b, n);
    const la = lenOf(na);
    const lb = lenOf(nbb);
    return { order: walk(la <= lb ? na : nbb, n), length: Math.min(la, lb), components: 0 };
  }
  const na = neighboursOf(a, n);
  const nbB = neighboursOf(b, n);
  const inB = (u: number, v: number): boolean => nbB[2 * u] === v || nbB[2 * u + 1] === v;
  const inA = (u: number, v: number): boolean => na[2 * u] === v || na[2 * u + 1] === v;

  // Components of the graph of edges in exactly one parent (union–find).
  const { find, union } = createDisjointSets(n);
  const own = new Uint8Array(n);
  for (let v = 0; v < n; v++) {
    for (let s = 0; s < 2; s++) {
      const u = na[2 * v + s]!;
      if (!inB(v, u)) {
        own[v] = 1;
        union(u, v);
      }
      const w = nbB[2 * v + s]!;
      if (!inA(v, w)) {
        own[v] = 1;
        union(w, v);
      }
    }
  }
  // Per component: both parents' lengths of their own edges, and whether the portal pairs agree.
  const root = new Int32Array(n);
  for (let v = 0; v < n; v++) root[v] = own[v] ? find(v) : -1;
  const costA = new Float64Array(n);
  const costB = new Float64Array(n);
  for (let v = 0; v < n; v++) {
    const r = root[v]!;
    if (r < 0) continue;
    for (let s = 0; s < 2; s++) {
      const u = na[2 * v + s]!;
      if (!inB(v, u)) costA[r] = costA[r]! + d[v * n + u]! / 2;
      const w = nbB[2 * v + s]!;
      if (!inA(v, w)) costB[r] = costB[r]! + d[v * n + w]! / 2;
    }
  }
  // Members of each component, and the components in order of what the other parent saves there.
  const members = new Map<number, number[]>();
  for (let v = 0; v < n; v++) {
    const r = root[v]!;
    if (r < 0) continue;
    const list = members.get(r);
    if (list) list.push(v);
    else members.set(r, [v]);
  }
  const child = new Int32Array(2 * n);
  const roots = [...members.keys()];
  const saving = roots.map((r) => costA[r]! - costB[r]!);
  const lengthA = lenOf(na);
  const setFrom = (ci: number, src: Int32Array): void => {
    for (const v of members.get(roots[ci]!)!) {
      child[2 * v] = src[2 * v]!;
      child[2 * v + 1] = src[2 * v + 1]!;
    }
  };
  if (roots.length <= EXHAUSTIVE_COMPONENTS) {
    // Every choice of parent per component, shortest first; the first that is one circuit wins.
    const masks = Array.from({ length: 1 << roots.length }, (_, mask) => mask);
    const lenOfMask = (mask: number): number => {
      let s = lengthA;
      for (let c = 0; c < roots.length; c++) if (mask & (1 << c)) s -= saving[c]!;
      return s;
    };
    const lens = masks.map(lenOfMask);
    masks.sort((x, y) => lens[x]! - lens[y]! || x - y);
    for (const mask of masks) {
      child.set(na);
      for (let c = 0; c < roots.length; c++) if (mask & (1 << c)) setFrom(c, nbB);
      const order = walk(child, n);
      if (order.length === n) return { order, length: lenOf(child), components: roots.length };
    }
  }
  // Many components: from the shorter parent, each component the other parent makes shorter is
  // exchanged when the child stays one circuit, largest saving first (O(n) per component).
  const aShorter = lengthA <= lenOf(nbB);
  const base = aShorter ? na : nbB;
  const other = aShorter ? nbB : na;
  child.set(base);
  const order = roots.map((_, c) => c).filter((c) => (aShorter ? saving[c]! : -saving[c]!) > 1e-9);
  order.sort((x, y) => Math.abs(saving[y]!) - Math.abs(saving[x]!) || x - y);
  for (const c of order) {
    setFrom(c, other);
    if (walk(child, n).length !== n) setFrom(c, base);
  }
  return { order: walk(child, n), length: lenOf(child), components: roots.length };
}

/** Up to this many components every choice of parent per component is tried (2^k circuits walked at most). */
const EXHAUSTIVE_COMPONENTS = 12;

/** The circuit given by each point's two neighbours, from point 0; shorter than n when they form several cycles. */
function walk(nb: Int32Array, n: number): number[] {
  const order: number[] = [0];
  let prev = 0;
  let cur = nb[0]!;
  while (cur !== 0 && order.length <= n) {
    order.push(cur);
    const next = nb[2 * cur] !== prev ? nb[2 * cur]! : nb[2 * cur + 1]!;
    prev = cur;
    cur = next;
  }
  return order;
}
