/**
 * Generated waves for the batching tests and the batching bench: a rectangular plan (the plan
 * engine's generator), its walk graph and exact distances, and seeded random orders of a few lines
 * each on random bins. Everything is invented and fixed by the seed.
 */
import { buildDistanceIndex, pairDistance } from '../../../server/core/plan/distances';
import type { DistanceIndex } from '../../../server/core/plan/distances';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { RectangularPlanParams } from '../../../server/core/plan/generate';
import type { PlanGeometry } from '../../../server/core/plan/types';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import type { WalkGraph } from '../../../server/core/plan/walk-graph';
import { createRng } from '../../../server/core/rng';
import type { Order } from '../../../server/core/batch/types';

export interface Floor {
  plan: PlanGeometry;
  graph: WalkGraph;
  index: DistanceIndex;
  depotNode: number;
  distance: (a: number, b: number) => number;
}

/** Ten aisles of 30 m, 3 m apart, 15 bays, 3 levels, front and back cross aisles, depot front left. */
export const DEFAULT_FLOOR: RectangularPlanParams = { aisles: 10, aisleLengthM: 30, aisleSpacingM: 3, baysPerAisle: 15, levels: 3 };

export function floorOf(params: RectangularPlanParams = DEFAULT_FLOOR): Floor {
  const plan = generateRectangularPlan(params);
  const graph = buildWalkGraph(plan);
  const index = buildDistanceIndex(graph);
  return { plan, graph, index, depotNode: graph.depotNode[0]!, distance: (a, b) => pairDistance(index, a, b) };
}

export interface OrderGenOptions {
  orders: number;
  /** Lines per order, inclusive range. Default 2–4. */
  minLines?: number;
  maxLines?: number;
  /** Units per line, 1…maxQty. Default 3. */
  maxQty?: number;
  /** Per-unit weight and volume ranges. Defaults 0.1–2 kg, 0.2–4 L. */
  kg?: [number, number];
  litres?: [number, number];
}

/** Seeded orders on random bins of `floor`, refs O0001…, due one minute apart in input order. */
export function generateOrders(floor: Floor, seed: number, opts: OrderGenOptions): Order[] {
  const rng = createRng(seed);
  const minLines = opts.minLines ?? 2;
  const maxLines = opts.maxLines ?? 4;
  const maxQty = opts.maxQty ?? 3;
  const [kgLo, kgHi] = opts.kg ?? [0.1, 2];
  const [lLo, lHi] = opts.litres ?? [0.2, 4];
  const bins = floor.plan.bins;
  const orders: Order[] = [];
  for (let i = 0; i < opts.orders; i++) {
    const count = minLines + rng.int(maxLines - minLines + 1);
    const lines = Array.from({ length: count }, (_, k) => {
      const b = rng.int(bins.length);
      return {
        sku: `SKU-${b}-${k}`,
        qty: 1 + rng.int(maxQty),
        node: floor.graph.binNode[b]!,
        bin: bins[b]!.code,
        unitKg: Math.round((kgLo + (kgHi - kgLo) * rng.next()) * 100) / 100,
        unitLitres: Math.round((lLo + (lHi - lLo) * rng.next()) * 100) / 100,
      };
    });
    orders.push({ ref: `O${String(i + 1).padStart(4, '0')}`, lines, due: 1_800_000_000_000 + i * 60_000 });
  }
  return orders;
}
