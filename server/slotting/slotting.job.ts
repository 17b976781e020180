/**
 * One slotting run, as pure work on plain data so it runs off the server's event loop: the plan's walk
 * graph and distances built from its geometry and open closures, then `planSlotting`, then picks per
 * bin before and after for the heat maps.
 */
import type { Cart } from '../core/batch/types';
import { buildDistanceIndex, pairDistance } from '../core/plan/distances';
import type { PlanClosure, PlanGeometry } from '../core/plan/types';
import { buildWalkGraph } from '../core/plan/walk-graph';
import { slotBinsOf } from '../core/slotting/generate';
import { planSlotting } from '../core/slotting/index';
import type { HistoryOrder, SlotSku, SlottingMethod, WeightRule } from '../core/slotting/types';
import type { SlottingResults } from '../../shared/slotting';

export interface SlottingJobInput {
  planId: number;
  geometry: PlanGeometry;
  closures: PlanClosure[];
  depotIndex: number;
  pinnedBins: string[];
  pinnedZones: string[];
  skus: SlotSku[];
  history: HistoryOrder[];
  method: SlottingMethod;
  maxMoves: number | null;
  weightRule: WeightRule | null;
  learnShare: number;
  cart: Cart;
  walkingMps: number;
  timeLimitMs: number;
}

export function runSlottingJob(input: SlottingJobInput, progress: (fraction: number) => void): SlottingResults {
  const graph = buildWalkGraph(input.geometry, input.closures);
  const index = buildDistanceIndex(graph);
  const zones = new Set(input.pinnedZones);
  const pinned = new Set([...input.pinnedBins, ...input.geometry.bins.filter((b) => b.zone !== null && zones.has(b.zone)).map((b) => b.code)]);
  const result = planSlotting({
    bins: slotBinsOf(input.geometry, graph, pinned),
    skus: input.skus,
    history: input.history,
    method: input.method,
    depotNode: graph.depotNode[input.depotIndex] ?? graph.depotNode[0]!,
    distance: (a, b) => pairDistance(index, a, b),
    cart: input.cart,
    ...(input.maxMoves === null ? {} : { maxMoves: input.maxMoves }),
    ...(input.weightRule === null ? {} : { weightRule: input.weightRule }),
    learnFraction: input.learnShare,
    walkingMps: input.walkingMps,
    timeLimitMs: input.timeLimitMs,
    progress,
  });
  const picks = new Map<string, number>();
  for (const o of input.history) for (const l of o.lines) picks.set(l.sku, (picks.get(l.sku) ?? 0) + 1);
  const before: Record<string, number> = {};
  const after: Record<string, number> = {};
  for (const s of input.skus) {
    const n = picks.get(s.code) ?? 0;
    if (n === 0) continue;
    if (s.bin !== null) before[s.bin] = (before[s.bin] ?? 0) + n;
    const to = result.assignment.get(s.code) ?? s.bin;
    if (to !== null) after[to] = (after[to] ?? 0) + n;
  }
  return {
    planId: input.planId,
    figures: result.figures,
    moves: result.moves,
    heat: { before, after },
    notes: result.notes,
    walkingMps: input.walkingMps,
    ms: result.ms,
  };
}
