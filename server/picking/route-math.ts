/**
 * Walking figures for trips being picked, on the plan's shortest-path distances: the order the
 * remaining stops should follow after "Skip for now", metres actually walked, and metres still to go.
 */
import { matrixFromFunction } from '../core/matrix';
import { solveTour } from '../core/tour/index';

export type Distance = (a: number, b: number) => number;

/** Re-sequencing budget: a trip has tens of stops, so 2-opt + Or-opt finish far inside it. */
export const RESEQUENCE_BUDGET_MS = 200;

/**
 * Order of the `free` stops (node ids) for an open walk that starts at node `from` and ends at node
 * `to` (the first stop of the fixed tail: the skipped ones). Returns indices into `free`.
 *
 * A Hamiltonian path with fixed ends becomes a closed circuit by adding a dummy point joined to both
 * ends at 0 and to every other point at a length above any walk (the classic reduction, e.g.
 * Lawler et al., *The Traveling Salesman Problem*, 1985); the tour engine then solves the circuit.
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
  return nearestNeighbourPath(free, from, distance);
}

/** Greedy fallback: always the nearest remaining stop next. O(k²). */
function nearestNeighbourPath(free: readonly number[], from: number, distance: Distance): number[] {
  const left = new Set(free.map((_, i) => i));
  const out: number[] = [];
  let at = from;
  while (left.size) {
    let best = -1;
    let bestD = Infinity;
    for (const i of left) {
      const v = distance(at, free[i]!);
      if (v < bestD || best < 0) {
        bestD = v;
        best = i;
      }
    }
    out.push(best);
    left.delete(best);
    at = free[best]!;
  }
  return out;
}

/** Metres of the closed walk depot → nodes in the given order → depot. 0 for no nodes. */
export function closedWalkMetres(depot: number, nodes: readonly number[], distance: Distance): number {
  if (nodes.length === 0) return 0;
  let sum = 0;
  let at = depot;
  for (const n of nodes) {
    sum += distance(at, n);
    at = n;
  }
  return sum + distance(at, depot);
}

/** Metres from `from` through `nodes` in order and back to the depot; 0 when nothing is left. */
export function remainingMetres(from: number, nodes: readonly number[], depot: number, distance: Distance): number {
  if (nodes.length === 0) return from === depot ? 0 : distance(from, depot);
  let sum = 0;
  let at = from;
  for (const n of nodes) {
    sum += distance(at, n);
    at = n;
  }
  return sum + distance(at, depot);
}
