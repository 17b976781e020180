/**
 * The site model: one floor plan made ready for slotting and routing. Built once per plan (or per
 * what-if of a study): the walk graph, the shortest walking distances between its nodes, the block
 * layout the routing policies read, the bin → access-point map and the depot trips start from. Slotting
 * (./slot.ts) and routing (./route.ts, ./walk.ts) read everything they need from it.
 */
import { buildDistanceIndex, pairDistance, type DistanceIndex, type DistanceIndexOptions } from '../plan/distances';
import type { PlanClosure, PlanGeometry } from '../plan/types';
import { buildWalkGraph, type WalkGraph } from '../plan/walk-graph';
import { toBlockLayout, type BlockLayout } from '../policy/layout';
import type { NotApplicable, PolicyStop } from '../policy/types';
import { isNotApplicable } from '../policy/types';

/** Thrown for a model that cannot be built as asked (a depot the plan does not have). */
export class SiteModelError extends RangeError {
  constructor(message: string) {
    super(message);
    this.name = 'SiteModelError';
  }
}

export interface SiteModelInput {
  geometry: PlanGeometry;
  /**
   * Open closures. The walk graph is built with them (when `graph` is not given), and the routing
   * policies do not apply while any is open (see `toBlockLayout`). Default none.
   */
  closures?: readonly PlanClosure[];
  /**
   * Index into `geometry.depots` of the depot trips start from. Default 0; a plan with no depot then
   * gets `depotNode` −1 (nothing is reachable) instead of an error.
   */
  depotIdx?: number;
  /** A walk graph already built for `geometry` and `closures` (e.g. read back from storage). */
  graph?: WalkGraph;
  /** Its distance index, likewise; built from the graph when absent. */
  index?: DistanceIndex;
  /** Options of the distance index build when it is built here (time budget, hub limit). */
  distanceOptions?: DistanceIndexOptions;
}

export interface SiteModel {
  readonly geometry: PlanGeometry;
  readonly closures: readonly PlanClosure[];
  readonly graph: WalkGraph;
  readonly index: DistanceIndex;
  /** Index into `geometry.depots` of the depot trips start from. */
  readonly depotIdx: number;
  /** Walk-graph node of that depot; −1 for a plan without depots. */
  readonly depotNode: number;
  /** Node of each depot, in `geometry.depots` order. */
  readonly depotNodes: Int32Array;
  /** Index into `geometry.bins` of a bin code; undefined when the code is not on the plan. */
  binIndex(code: string): number | undefined;
  /** Access-point node of a bin code; undefined when the code is not on the plan or the bin has no access point. */
  binNode(code: string): number | undefined;
  /** Shortest walking distance in metres between two nodes; Infinity when no walk joins them. O(1). */
  distance(a: number, b: number): number;
  /** The plan as a parallel-aisle block layout for the routing policies (built for this depot), or why not. Computed on first use. */
  readonly layout: BlockLayout | NotApplicable;
  /** Where a node lies on the block layout; null off its aisles or without a layout. */
  stopOf(node: number): PolicyStop | null;
  /** True when a walk from the depot reaches the node (and back: the graph is undirected). O(1). */
  reachesDepot(node: number): boolean;
}

/**
 * Builds the site model of a plan. Cost: with `graph` and `index` given, O(bins) for the bin map;
 * otherwise the walk graph (O(B log B + A·C)) and the distance index (O(V + H² log H), about 70 ms at
 * 2,880 bins) as well. The block layout (O(aisles · cross aisles)) is computed on first use.
 *
 * @throws SiteModelError when `depotIdx` names a depot the plan does not have.
 * @throws DistanceBudgetError (../plan/distances) when the index exceeds `distanceOptions`.
 */
export function buildSiteModel(input: SiteModelInput): SiteModel {
  const geometry = input.geometry;
  const closures = input.closures ?? [];
  const graph = input.graph ?? buildWalkGraph(geometry, closures);
  const index = input.index ?? buildDistanceIndex(graph, input.distanceOptions);
  const depotIdx = input.depotIdx ?? 0;
  let depotNode = graph.depotNode[depotIdx];
  if (depotNode === undefined) {
    if (input.depotIdx !== undefined || geometry.depots.length > 0) throw new SiteModelError(`the plan has no depot number ${depotIdx + 1}`);
    depotNode = -1;
  }
  const byCode = new Map<string, number>();
  geometry.bins.forEach((b, i) => byCode.set(b.code, i));

  let layout: BlockLayout | NotApplicable | undefined;
  const layoutOf = (): BlockLayout | NotApplicable => {
    if (layout) return layout;
    const depot = geometry.depots[depotIdx];
    layout = depot ? toBlockLayout(geometry, { depot: depot.code, closures }) : { reason: 'the plan has no depot' };
    return layout;
  };
  const distance = (a: number, b: number): number => pairDistance(index, a, b);

  return {
    geometry,
    closures,
    graph,
    index,
    depotIdx,
    depotNode,
    depotNodes: graph.depotNode,
    binIndex: (code) => byCode.get(code),
    binNode: (code) => {
      const i = byCode.get(code);
      if (i === undefined) return undefined;
      const node = graph.binNode[i]!;
      return node >= 0 ? node : undefined;
    },
    distance,
    get layout() {
      return layoutOf();
    },
    stopOf: (node) => {
      const l = layoutOf();
      if (isNotApplicable(l)) return null;
      const a = graph.aisle[node] ?? -1;
      if (a < 0) return null;
      const i = l.aisleIndex.get(geometry.aisles[a]!.code);
      return i === undefined ? null : { aisle: i, y: graph.y[node]! };
    },
    reachesDepot: (node) => {
      if (depotNode < 0 || node < 0) return false;
      return Number.isFinite(distance(depotNode, node));
    },
  };
}
