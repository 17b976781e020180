/**
 * Planning a wave on a stored floor plan: slot each order line to its bin's access point, run the
 * engine's planWave, and add what the screens need (route polylines, minutes at the site's speeds).
 * Pure apart from its inputs, so the server's worker and the CLI call the very same function.
 */
import { planWave, type PlanWaveResult } from '../core/batch/plan-wave';
import type { DistanceIndex } from '../core/plan/distances';
import type { PlanClosure, PlanGeometry } from '../core/plan/types';
import type { WalkGraph } from '../core/plan/walk-graph';
import { isNotApplicable } from '../core/policy/types';
import { buildSiteModel, slotOrders, walkPolyline, type SlotLine, type SlotOrder } from '../core/site/index';
import type { ImproveMode, TourMethod } from '../core/tour/index';
import type { BatchingName } from '../../shared/waves';

export type PlannerOrderLine = SlotLine;

export interface PlannerOrder extends SlotOrder {
  lines: PlannerOrderLine[];
}

export interface SiteSpeeds {
  walkingSpeedMps: number;
  secondsPerLine: number;
  secondsPerStop: number;
}

export interface PlannerInput {
  geometry: PlanGeometry;
  /** Open closures the stored graph was built with: while any is open the routing policies, and so the S-shape comparison, do not apply. */
  closures?: PlanClosure[];
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
  /** Orders with a bin not on the plan, off its walk graph or unreachable, with the reason (../core/site/slot.ts); they are left out. */
  unslotted: { order: string; reason: string }[];
}

/** Minutes for a trip: walking at the site's speed plus handling per line and per stop. */
export function estimateMinutes(metres: number, lines: number, stops: number, s: SiteSpeeds): number {
  return (metres / s.walkingSpeedMps + lines * s.secondsPerLine + stops * s.secondsPerStop) / 60;
}

export function planWaveOnPlan(input: PlannerInput): PlannerOutput {
  const model = buildSiteModel({ geometry: input.geometry, closures: input.closures ?? [], graph: input.graph, index: input.index, depotIdx: input.depotIdx });
  const { depotNode, graph } = model;
  const { orders, unslotted } = slotOrders(model, input.orders);
  const layout = model.layout;

  const result = planWave({
    orders,
    cart: input.cart,
    batching: input.batching,
    routing: { method: input.method, improve: input.improve },
    depotNode,
    distance: model.distance,
    ...(isNotApplicable(layout) ? {} : { policyLayout: { layout, stopOf: model.stopOf } }),
    ...(input.timeLimitMs !== undefined ? { timeLimitMs: input.timeLimitMs } : {}),
    ...(input.progress ? { progress: input.progress } : {}),
  });

  // Say why there is no S-shape figure, as the command line does.
  if (isNotApplicable(layout)) result.totals.sShapeNote = `no S-shape figure: ${layout.reason}`;

  let estTotal = 0;
  const trips = result.trips.map((t) => {
    const lines = t.stops.reduce((a, s) => a + s.lines.length, 0);
    const estMinutes = estimateMinutes(t.metres, lines, t.stops.length, input.speeds);
    estTotal += estMinutes;
    const stopXY = t.stops.flatMap((s) => [graph.x[s.node]!, graph.y[s.node]!]);
    return {
      path: walkPolyline(
        model,
        t.stops.map((s) => s.node),
      ),
      estMinutes,
      lines,
      stopXY,
    };
  });
  return {
    result,
    trips,
    depot: [graph.x[depotNode]!, graph.y[depotNode]!],
    estMinutes: estTotal,
    unslotted: unslotted.map((u) => ({ order: u.order, reason: u.reason })),
  };
}
