/**
 * Planning a wave on a stored floor plan: slot each order line to its bin's access point, run the
 * engine's planWave, and add what the screens need (route polylines, minutes at the site's speeds).
 * Pure apart from its inputs, so the server's worker and the CLI call the very same function.
 */
import { planWave, policyComparisonOf, type PlanWaveResult } from '../core/batch/plan-wave';
import type { Order } from '../core/batch/types';
import { circuitPolyline, pairDistance, type DistanceIndex } from '../core/plan/distances';
import type { PlanGeometry } from '../core/plan/types';
import type { WalkGraph } from '../core/plan/walk-graph';
import { isNotApplicable } from '../core/policy/types';
import type { ImproveMode, TourMethod } from '../core/tour/index';
import type { BatchingName } from '../../shared/waves';

export interface PlannerOrderLine {
  sku: string;
  qty: number;
  bin: string;
  unitKg: number;
  unitLitres: number;
}

export interface PlannerOrder {
  ref: string;
  /** ISO 8601 or null. */
  due: string | null;
  priority: number | null;
  lines: PlannerOrderLine[];
}

export interface SiteSpeeds {
  walkingSpeedMps: number;
  secondsPerLine: number;
  secondsPerStop: number;
}

export interface PlannerInput {
  geometry: PlanGeometry;
  graph: WalkGraph;
  index: DistanceIndex;
  orders: PlannerOrder[];
  cart: { totes: number; maxKg: number; maxLitres: number };
  batching: BatchingName;
  method: TourMethod;
  improve: ImproveMode;
  depotIdx: number;
  speeds: SiteSpeeds;
  timeLimitMs?: number;
  progress?: (fraction: number) => void;
}

export interface PlannedTripExtras {
  /** Interleaved x, y of the walked route (depot → stops → depot), metres. */
  path: number[];
  estMinutes: number;
  lines: number;
  /** Interleaved x, y of each stop's access point, in stop order. */
  stopXY: number[];
}

export interface PlannerOutput {
  result: PlanWaveResult;
  trips: PlannedTripExtras[];
  depot: [number, number];
  estMinutes: number;
  /** Orders that name a bin not on the plan (or unreachable), with the bins; they are left out. */
  unslotted: { order: string; reason: string }[];
}

/** Minutes for a trip: walking at the site's speed plus handling per line and per stop. */
export function estimateMinutes(metres: number, lines: number, stops: number, s: SiteSpeeds): number {
  return (metres / s.walkingSpeedMps + lines * s.secondsPerLine + stops * s.secondsPerStop) / 60;
}

export function planWaveOnPlan(input: PlannerInput): PlannerOutput {
  const { geometry, graph, index } = input;
  const nodeOf = new Map<string, number>();
  geometry.bins.forEach((b, i) => {
    const node = graph.binNode[i]!;
    if (node >= 0) nodeOf.set(b.code, node);
  });
  const depotNode = graph.depotNode[input.depotIdx];
  if (depotNode === undefined) throw new RangeError(`the plan has no depot number ${input.depotIdx + 1}`);

  const unslotted: PlannerOutput['unslotted'] = [];
  const orders: Order[] = [];
  for (const o of input.orders) {
    const missing = o.lines.filter((l) => !nodeOf.has(l.bin)).map((l) => l.bin);
    if (missing.length) {
      unslotted.push({ order: o.ref, reason: `bin ${[...new Set(missing)].join(', ')} is not on floor plan or has no access point` });
      continue;
    }
    orders.push({
      ref: o.ref,
      ...(o.due ? { due: Date.parse(o.due) } : {}),
      ...(o.priority !== null ? { priority: o.priority } : {}),
      lines: o.lines.map((l) => ({ sku: l.sku, qty: l.qty, node: nodeOf.get(l.bin)!, bin: l.bin, unitKg: l.unitKg, unitLitres: l.unitLitres })),
    });
  }

  const depot = geometry.depots[input.depotIdx]!;
  const policy = policyComparisonOf(geometry, graph, depot.code);
  const policyLayout = isNotApplicable(policy) ? undefined : policy;

  const result = planWave({
    orders,
    cart: input.cart,
    batching: input.batching,
    routing: { method: input.method, improve: input.improve },
    depotNode,
    distance: (a, b) => pairDistance(index, a, b),
    ...(policyLayout ? { policyLayout } : {}),
    ...(input.timeLimitMs !== undefined ? { timeLimitMs: input.timeLimitMs } : {}),
    ...(input.progress ? { progress: input.progress } : {}),
  });

  let estTotal = 0;
  const trips = result.trips.map((t) => {
    const circuit = [depotNode, ...t.stops.map((s) => s.node)];
    const poly = circuitPolyline(graph, circuit, true, index);
    const lines = t.stops.reduce((a, s) => a + s.lines.length, 0);
    const estMinutes = estimateMinutes(t.metres, lines, t.stops.length, input.speeds);
    estTotal += estMinutes;
    const stopXY = t.stops.flatMap((s) => [graph.x[s.node]!, graph.y[s.node]!]);
    return { path: poly ? Array.from(poly) : [], estMinutes, lines, stopXY };
  });
  return { result, trips, depot: [graph.x[depotNode]!, graph.y[depotNode]!], estMinutes: estTotal, unslotted };
}
