import type { PlanGeometry } from '../core/plan/types';
import { reachableFrom, type WalkGraph } from '../core/plan/walk-graph';

/**
 * Codes of the bins no walk from the first linked depot reaches (or that have no access point), in
 * plan order. With no linked depot every bin is listed. O(V + E + B).
 */
export function unreachableBinCodes(plan: PlanGeometry, graph: WalkGraph): string[] {
  let source = -1;
  for (let d = 0; d < plan.depots.length && source < 0; d++) if (graph.depotLink[d]! >= 0) source = graph.depotNode[d]!;
  const seen = reachableFrom(graph, source);
  const out: string[] = [];
  for (let b = 0; b < plan.bins.length; b++) {
    const node = graph.binNode[b]!;
    if (node < 0 || !seen[node]) out.push(plan.bins[b]!.code);
  }
  return out;
}
