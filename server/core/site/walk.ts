/**
 * Walks along node sequences on shortest walking distances: metres of a closed walk or of what is left
 * of one, the polyline a picker walks, and the order of the stops still open on a trip under way
 * (an open walk with both ends fixed).
 */
import { matrixFromFunction } from '../matrix';
import { circuitPolyline } from '../plan/distances';
import { nearestNeighbor } from '../tour/construct';
import { solveTour } from '../tour/index';
import type { SiteModel } from './model';

/** Shortest walking distance in metres between two nodes; Infinity when no walk joins them. */
export type Distance = (a: number, b: number) => number;

/** Re-sequencing budget: a trip has tens of stops, so 2-opt + Or-opt finish far inside it. */
export const RESEQUENCE_BUDGET_MS = 200;

/** Metres from `from` through `nodes` in order and on to `to`; 0 when nothing is left and `from` is `to`. O(k). */
export function remainingMetres(from: number, nodes: readonly number[], to: number, distance: Distance): number {
  if (nodes.length === 0) return from === to ? 0 : distance(from, to);
  let sum = 0;
  let at = from;
  for (const n of nodes) {
    sum += distance(at, n);
    at = n;
  }
  return sum + distance(at, to);
}

/** Metres of the closed walk depot → nodes in the given order → depot. 0 for no nodes. O(k). */
export function closedWalkMetres(depot: number, nodes: readonly number[], distance: Distance): number {
  return remainingMetres(depot, nodes, depot, distance);
}

/**
 * Order of the `free` stops (node ids) for an open walk that starts at node `from` and ends at node
 * `to` (the first stop of the fixed tail: the skipped ones). Returns indices into `free`.
 *
 * A Hamiltonian path with fixed ends becomes a closed circuit by adding a dummy point joined to both
 * ends at 0 and to every other point at a length above any walk (the classic reduction, e.g.
 * Lawler et al., *The Traveling Salesman Problem*, 1985); the tour engine then solves the circuit.
 * Should the circuit not pass the dummy between the two ends, nearest neighbor from `from` is used.
 * O(k²) matrix plus the engine's cost for k + 3 points. An empty `free` gives [].
 */
export function resequenceFree(free: readonly number[], from: number, to: number, distance: Distance): number[] {
  const k = free.length;
  if (k <= 1) return free.map((_, i) => i);
  // Points: 0 dummy, 1 from, 2 to, 3.. free.
  const nodes = [-1, from, to, ...free];
  let big = 1;
  const d = (i: number, j: number): number => {
    const v = distance(nodes[i]!, nodes[j]!);
    return Number.isFinite(v) ? v : 1e9;
  };
  for (let i = 1; i < nodes.length; i++) for (let j = i + 1; j < nodes.length; j++) big += d(i, j);
  const m = matrixFromFunction(nodes.length, (i, j) => {
    if (i === 0) return j === 1 || j === 2 ? 0 : big;
    return d(i, j);
  });
  const { order } = solveTour(m, { method: 'best', improve: 'local', timeLimitMs: RESEQUENCE_BUDGET_MS });
  // order = [0, …]; the dummy's two neighbours must be `from` and `to`.
  let path = order.slice(1);
  if (path[0] === 2 && path[path.length - 1] === 1) path = path.reverse();
  if (path[0] === 1 && path[path.length - 1] === 2) return path.slice(1, -1).map((p) => p - 3);
  // Greedy fallback: nearest neighbor over `from` (point 0) and the free stops (points 1..k).
  const open = matrixFromFunction(k + 1, (i, j) => distance(i === 0 ? from : free[i - 1]!, free[j - 1]!));
  return nearestNeighbor(open, 0)
    .slice(1)
    .map((p) => p - 1);
}

/**
 * The polyline of the closed walk depot → `stops` in order → depot along shortest paths: interleaved
 * x, y in metres. Empty when some leg has no walk. O(path length × degree).
 */
export function walkPolyline(model: SiteModel, stops: readonly number[]): number[] {
  const poly = circuitPolyline(model.graph, [model.depotNode, ...stops], true, model.index);
  return poly ? Array.from(poly) : [];
}
