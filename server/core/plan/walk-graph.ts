/**
 * Floor-plan geometry → walk graph. Nodes are points on aisle and cross-aisle centre lines (access
 * points, junctions, depot link points) plus the depots themselves; edges are the walkable stretches
 * between consecutive points on one centre line, and one straight link from each depot.
 * Adjacency is compressed (CSR) in typed arrays so the shortest-path code can loop over it cheaply.
 */
import type { PlanClosure, PlanGeometry } from './types';
import { DEPOT_LINK_MAX_M, POSITION_TOLERANCE_M } from './types';

/** Node kind bits: one node can be several things at once (a bin's access point at a junction). */
export const NODE_ACCESS = 1;
export const NODE_JUNCTION = 2;
export const NODE_DEPOT = 4;
export const NODE_DEPOT_LINK = 8;

export interface WalkGraph {
  readonly nodeCount: number;
  /** Node position, metres. */
  readonly x: Float64Array;
  readonly y: Float64Array;
  /** Bitwise OR of NODE_ACCESS | NODE_JUNCTION | NODE_DEPOT | NODE_DEPOT_LINK. */
  readonly kind: Uint8Array;
  /** Index into `plan.aisles` of the aisle the node lies on, or -1. */
  readonly aisle: Int32Array;
  /** Index into `plan.crossAisles` of the cross aisle the node lies on, or -1. */
  readonly crossAisle: Int32Array;
  /** CSR: the neighbours of node u are `targets[offsets[u] .. offsets[u + 1])`. Length nodeCount + 1. */
  readonly offsets: Int32Array;
  readonly targets: Int32Array;
  /** Edge length in metres, parallel to `targets`. Every undirected edge appears twice. */
  readonly lengths: Float64Array;
  /** Access-point node of each bin (index into `plan.bins`), or -1 when its aisle is unknown or its y lies outside the aisle. */
  readonly binNode: Int32Array;
  /** Node of each depot (index into `plan.depots`); always present, isolated when it cannot link. */
  readonly depotNode: Int32Array;
  /** Centre-line node each depot links to, or -1 when no centre line lies within DEPOT_LINK_MAX_M. */
  readonly depotLink: Int32Array;
}

/** One thing placed on a centre line, before points closer than the tolerance are merged. */
interface LineEntry {
  pos: number;
  /** 0 junction, 1 depot link, 2 bin: junctions first so a merged point takes the junction's exact position. */
  type: 0 | 1 | 2;
  /** Cross-aisle index (junction), depot index (link) or bin index (bin). */
  ref: number;
}

const byPosThenType = (a: LineEntry, b: LineEntry): number => a.pos - b.pos || a.type - b.type || a.ref - b.ref;

/**
 * Builds the walk graph of a checked plan. Closures cut every edge whose stretch overlaps a closed
 * range by more than POSITION_TOLERANCE_M; a point at a closure end stays reachable from the open
 * side, a point strictly inside becomes isolated (a dead-end stub up to the closure end never shortens
 * a walk, so it gets no node). Closures naming no aisle or cross aisle are ignored here and reported
 * by `diagnosePlan`.
 *
 * Depot links ignore closures: the link goes to the nearest point on any centre line (aisles before
 * cross aisles, plan order, on ties); a closure there leaves the depot cut off, which diagnostics show.
 *
 * Complexity O(B log B + A·C + D·(A + C)) for B bins, A aisles, C cross aisles, D depots.
 * Node order is deterministic: aisles in plan order (points by increasing y), then cross-aisle-only
 * points, then depots.
 */
export function buildWalkGraph(plan: PlanGeometry, closures: readonly PlanClosure[] = []): WalkGraph {
  const tol = POSITION_TOLERANCE_M;
  const { aisles, crossAisles, bins, depots } = plan;
  const A = aisles.length;
  const C = crossAisles.length;

  const aisleByCode = new Map<string, number>();
  aisles.forEach((a, i) => aisleByCode.set(a.code, i));

  const aisleEntries: LineEntry[][] = aisles.map(() => []);
  const crossEntries: LineEntry[][] = crossAisles.map(() => []);

  for (let a = 0; a < A; a++) {
    const aisle = aisles[a]!;
    const lo = Math.min(aisle.yStart, aisle.yEnd);
    const hi = Math.max(aisle.yStart, aisle.yEnd);
    for (let c = 0; c < C; c++) {
      const cross = crossAisles[c]!;
      const xlo = Math.min(cross.xStart, cross.xEnd);
      const xhi = Math.max(cross.xStart, cross.xEnd);
      if (cross.y >= lo - tol && cross.y <= hi + tol && aisle.x >= xlo - tol && aisle.x <= xhi + tol) {
        aisleEntries[a]!.push({ pos: cross.y, type: 0, ref: c });
      }
    }
  }

  const binNode = new Int32Array(bins.length).fill(-1);
  for (let b = 0; b < bins.length; b++) {
    const bin = bins[b]!;
    const a = aisleByCode.get(bin.aisle);
    if (a === undefined) continue;
    const aisle = aisles[a]!;
    if (bin.y < Math.min(aisle.yStart, aisle.yEnd) - tol || bin.y > Math.max(aisle.yStart, aisle.yEnd) + tol) continue;
    aisleEntries[a]!.push({ pos: bin.y, type: 2, ref: b });
  }

  // Nearest point of every centre line; strict `<` keeps the first line on ties.
  for (let d = 0; d < depots.length; d++) {
    const depot = depots[d]!;
    let best = Infinity;
    let bestLine = -1;
    let bestPos = 0;
    for (let a = 0; a < A; a++) {
      const aisle = aisles[a]!;
      const py = clamp(depot.y, aisle.yStart, aisle.yEnd);
      const dist = Math.hypot(depot.x - aisle.x, depot.y - py);
      if (dist < best) [best, bestLine, bestPos] = [dist, a, py];
    }
    for (let c = 0; c < C; c++) {
      const cross = crossAisles[c]!;
      const px = clamp(depot.x, cross.xStart, cross.xEnd);
      const dist = Math.hypot(depot.x - px, depot.y - cross.y);
      if (dist < best) [best, bestLine, bestPos] = [dist, A + c, px];
    }
    if (bestLine < 0 || best > DEPOT_LINK_MAX_M) continue;
    if (bestLine < A) aisleEntries[bestLine]!.push({ pos: bestPos, type: 1, ref: d });
    else crossEntries[bestLine - A]!.push({ pos: bestPos, type: 1, ref: d });
  }

  const xs: number[] = [];
  const ys: number[] = [];
  const kinds: number[] = [];
  const nodeAisle: number[] = [];
  const nodeCross: number[] = [];
  const addNode = (x: number, y: number, kind: number, a: number, c: number): number => {
    xs.push(x);
    ys.push(y);
    kinds.push(kind);
    nodeAisle.push(a);
    nodeCross.push(c);
    return xs.length - 1;
  };

  const edgeU: number[] = [];
  const edgeV: number[] = [];
  const edgeLen: number[] = [];
  const addEdge = (u: number, v: number, len: number): void => {
    edgeU.push(u);
    edgeV.push(v);
    edgeLen.push(len);
  };

  const aisleClosures: [number, number][][] = aisles.map(() => []);
  const crossClosures: [number, number][][] = crossAisles.map(() => []);
  const crossByCode = new Map<string, number>();
  crossAisles.forEach((c, i) => crossByCode.set(c.code, i));
  for (const cl of closures) {
    const range: [number, number] = [Math.min(cl.from, cl.to), Math.max(cl.from, cl.to)];
    const i = cl.kind === 'aisle' ? aisleByCode.get(cl.code) : crossByCode.get(cl.code);
    if (i === undefined) continue;
    (cl.kind === 'aisle' ? aisleClosures : crossClosures)[i]!.push(range);
  }
  const isCut = (ranges: [number, number][], p: number, q: number): boolean => {
    for (const [lo, hi] of ranges) if (lo < q - tol && hi > p + tol) return true;
    return false;
  };

  const junctionNode = new Map<number, number>();
  const depotLink = new Int32Array(depots.length).fill(-1);

  for (let a = 0; a < A; a++) {
    const entries = aisleEntries[a]!.sort(byPosThenType);
    const ax = aisles[a]!.x;
    let prevNode = -1;
    let prevPos = 0;
    let i = 0;
    while (i < entries.length) {
      const start = entries[i]!.pos;
      let kind = 0;
      let cross = -1;
      const node = addNode(ax, start, 0, a, -1);
      for (; i < entries.length && entries[i]!.pos - start <= tol; i++) {
        const e = entries[i]!;
        if (e.type === 0) {
          kind |= NODE_JUNCTION;
          // Two cross aisles within the tolerance at one point: the first one owns the node.
          if (cross < 0) cross = e.ref;
          junctionNode.set(a * C + e.ref, node);
        } else if (e.type === 1) {
          kind |= NODE_DEPOT_LINK;
          depotLink[e.ref] = node;
        } else {
          kind |= NODE_ACCESS;
          binNode[e.ref] = node;
        }
      }
      kinds[node] = kind;
      nodeCross[node] = cross;
      if (cross >= 0) ys[node] = crossAisles[cross]!.y;
      if (prevNode >= 0 && !isCut(aisleClosures[a]!, prevPos, ys[node]!)) addEdge(prevNode, node, ys[node]! - prevPos);
      prevNode = node;
      prevPos = ys[node]!;
    }
  }

  for (let c = 0; c < C; c++) {
    const cross = crossAisles[c]!;
    const points: { pos: number; node: number; link: number }[] = [];
    for (let a = 0; a < A; a++) {
      const node = junctionNode.get(a * C + c);
      if (node !== undefined) points.push({ pos: aisles[a]!.x, node, link: -1 });
    }
    const junctionCount = points.length;
    for (const e of crossEntries[c]!) {
      // A link point within the tolerance of a junction is that junction.
      let node = -1;
      for (let k = 0; k < junctionCount && node < 0; k++) if (Math.abs(points[k]!.pos - e.pos) <= tol) node = points[k]!.node;
      if (node >= 0) {
        kinds[node] = kinds[node]! | NODE_DEPOT_LINK;
        depotLink[e.ref] = node;
      } else {
        points.push({ pos: e.pos, node: -1, link: e.ref });
      }
    }
    points.sort((p, q) => p.pos - q.pos || q.node - p.node || p.link - q.link);
    let prevNode = -1;
    let prevPos = 0;
    for (const p of points) {
      let node = p.node;
      if (node < 0) {
        // Two depots linking within the tolerance of each other share one link point.
        if (prevNode >= 0 && p.pos - prevPos <= tol) node = prevNode;
        else node = addNode(p.pos, cross.y, 0, -1, c);
        kinds[node] = kinds[node]! | NODE_DEPOT_LINK;
        depotLink[p.link] = node;
      }
      if (node === prevNode) continue;
      const pos = xs[node]!;
      if (prevNode >= 0 && !isCut(crossClosures[c]!, prevPos, pos)) addEdge(prevNode, node, pos - prevPos);
      prevNode = node;
      prevPos = pos;
    }
  }

  const depotNode = new Int32Array(depots.length);
  for (let d = 0; d < depots.length; d++) {
    const depot = depots[d]!;
    const node = addNode(depot.x, depot.y, NODE_DEPOT, -1, -1);
    depotNode[d] = node;
    const link = depotLink[d]!;
    if (link >= 0) addEdge(node, link, Math.hypot(depot.x - xs[link]!, depot.y - ys[link]!));
  }

  const n = xs.length;
  const offsets = new Int32Array(n + 1);
  for (let e = 0; e < edgeU.length; e++) {
    offsets[edgeU[e]! + 1]!++;
    offsets[edgeV[e]! + 1]!++;
  }
  for (let u = 0; u < n; u++) offsets[u + 1]! += offsets[u]!;
  const fill = offsets.slice(0, n);
  const targets = new Int32Array(2 * edgeU.length);
  const lengths = new Float64Array(2 * edgeU.length);
  for (let e = 0; e < edgeU.length; e++) {
    const u = edgeU[e]!;
    const v = edgeV[e]!;
    const len = edgeLen[e]!;
    targets[fill[u]!] = v;
    lengths[fill[u]!++] = len;
    targets[fill[v]!] = u;
    lengths[fill[v]!++] = len;
  }

  return {
    nodeCount: n,
    x: Float64Array.from(xs),
    y: Float64Array.from(ys),
    kind: Uint8Array.from(kinds),
    aisle: Int32Array.from(nodeAisle),
    crossAisle: Int32Array.from(nodeCross),
    offsets,
    targets,
    lengths,
    binNode,
    depotNode,
    depotLink,
  };
}

/** Number of undirected edges. */
export function edgeCount(graph: WalkGraph): number {
  return graph.targets.length / 2;
}

/** Nodes reachable from `source` (1 = reached), by breadth-first search. O(V + E). */
export function reachableFrom(graph: WalkGraph, source: number): Uint8Array {
  const seen = new Uint8Array(graph.nodeCount);
  if (source < 0 || source >= graph.nodeCount) return seen;
  const queue = new Int32Array(graph.nodeCount);
  let head = 0;
  let tail = 0;
  queue[tail++] = source;
  seen[source] = 1;
  while (head < tail) {
    const u = queue[head++]!;
    for (let k = graph.offsets[u]!; k < graph.offsets[u + 1]!; k++) {
      const v = graph.targets[k]!;
      if (!seen[v]) {
        seen[v] = 1;
        queue[tail++] = v;
      }
    }
  }
  return seen;
}

function clamp(v: number, a: number, b: number): number {
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  return v < lo ? lo : v > hi ? hi : v;
}
