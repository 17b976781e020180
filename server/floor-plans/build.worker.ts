/**
 * Worker job: plan geometry (checked upload, or generator parameters) → walk graph → distance index,
 * serialised for BLOB storage, with stats and the bins no walk reaches. Runs in a fresh worker
 * (server/workers/spawn.ts runInWorker) so a 50,000-bin build never blocks the server's event loop.
 */
import { defaultClock } from '../core/clock';
import { buildDistanceIndex, DistanceBudgetError } from '../core/plan/distances';
import { generateRectangularPlan, type RectangularPlanParams } from '../core/plan/generate';
import { serializeDistanceIndex, serializeWalkGraph } from '../core/plan/serialize';
import type { PlanClosure, PlanGeometry } from '../core/plan/types';
import { buildWalkGraph, NODE_ACCESS } from '../core/plan/walk-graph';
import { serveJob } from '../workers/worker-protocol';
import type { BuildInput, BuildOutput, BuildProgress, BuildRefusal } from './build';
import { packPlan, unpackPlan } from './packed-plan';
import { unreachableBinCodes } from './reachability';

function build(input: BuildInput, progress: (p: BuildProgress) => void): BuildOutput {
  const t0 = defaultClock();
  progress({ phase: 'building_graph', fraction: 0 });
  const plan: PlanGeometry = input.kind === 'generate' ? generateRectangularPlan(input.params as RectangularPlanParams) : unpackPlan(input.plan);
  const closures: PlanClosure[] = input.closures;
  const graph = buildWalkGraph(plan, closures);
  progress({ phase: 'building_distances', fraction: 0 });
  const index = buildDistanceIndex(graph, { clock: defaultClock, budgetMs: input.budgetMs });
  progress({ phase: 'building_distances', fraction: 1 });

  let accessPoints = 0;
  for (let u = 0; u < graph.nodeCount; u++) if (graph.kind[u]! & NODE_ACCESS) accessPoints++;
  let totalAisleLengthM = 0;
  for (const a of plan.aisles) totalAisleLengthM += Math.abs(a.yEnd - a.yStart);

  const g = serializeWalkGraph(graph);
  const ix = serializeDistanceIndex(index);
  return {
    plan: input.kind === 'generate' ? packPlan(plan) : null,
    graph: { json: g.json, blobs: g.blobs },
    index: { json: ix.json, blobs: ix.blobs },
    storedBytes: g.byteLength + ix.byteLength,
    stats: {
      bins: plan.bins.length,
      aisles: plan.aisles.length,
      crossAisles: plan.crossAisles.length,
      accessPoints,
      depots: plan.depots.length,
      totalAisleLengthM: Math.round(totalAisleLengthM * 1000) / 1000,
    },
    nodeCount: graph.nodeCount,
    hubCount: index.hubCount,
    unreachableBins: unreachableBinCodes(plan, graph),
    buildMs: defaultClock() - t0,
  };
}

// A plan the engine refuses (generator parameters out of range, too many hubs, over budget) is an
// answer, not a crash: it goes back as a refusal, since error classes do not cross the thread.
serveJob<BuildInput, BuildProgress, BuildOutput | BuildRefusal>((input, progress) => {
  try {
    return build(input, progress);
  } catch (err) {
    if (err instanceof RangeError || err instanceof DistanceBudgetError) return { refused: err.message };
    throw err;
  }
});
