/**
 * One trip routed by any method on a site model: a tour method of ../tour (a construction plus an
 * improvement, or Held–Karp's exact circuit) on the shortest walking distances, or a routing policy of
 * ../policy on the model's block layout.
 */
import { improveFromVisits } from '../batch/plan-wave';
import type { Clock } from '../clock';
import { defaultClock } from '../clock';
import type { DistanceMatrix } from '../matrix';
import { tripMatrix } from '../plan/distances';
import { combined, largestGap, midpoint, returnPolicy, sShape } from '../policy/policies';
import { ratliffRosenthal } from '../policy/ratliff-rosenthal';
import { isNotApplicable, type PathPoint, type PolicyName, type PolicyResult, type PolicyStop } from '../policy/types';
import { DEFAULT_TIME_LIMIT_MS, HELD_KARP_MAX_POINTS, solveTour, type ImproveMode, type TourMethod } from '../tour/index';
import type { SiteModel } from './model';

/** A routing method: `<construction>+<improvement>` of the tour engine, `exact` (Held–Karp) or a policy. */
export type RouteMethod = `${TourMethod}+${ImproveMode}` | 'exact' | PolicyName;

const POLICY_FNS = {
  's-shape': sShape,
  return: returnPolicy,
  midpoint,
  'largest-gap': largestGap,
  combined,
  'ratliff-rosenthal': ratliffRosenthal,
} as const satisfies Record<PolicyName, unknown>;

/** True for the warehouse routing policies (they walk the block layout, not the distance matrix). */
export const isPolicyMethod = (method: RouteMethod): method is PolicyName => method in POLICY_FNS;

export interface RouteOptions {
  /** Depot + stops matrix (`tripMatrixOf`), when the caller has it already. */
  matrix?: DistanceMatrix;
  /** Seed of `deep`'s kicks; default 1. */
  seed?: number;
  /** A fresh clock for each tour solved; default the wall clock. */
  clock?: () => Clock;
  /** Budget of a tour method in the clock's units; default 1000. */
  timeLimitMs?: number;
  /** Budget of a `deep` improvement; default `timeLimitMs`. */
  deepTimeLimitMs?: number;
  /**
   * Restart local search from the S-shape visiting order on block layouts and keep the shorter circuit
   * (what the wave planner does, so a circuit is never longer than the S-shape walk). Tour methods only.
   */
  restartFromSShape?: boolean;
}

export interface TripRoute {
  /** Metres, depot to depot; null when the method does not apply. */
  length: number | null;
  /** Visiting order as indices into the trip's stops. */
  visits: number[];
  /** Why the method does not apply, or null. */
  reason: string | null;
  /** Axis-parallel path of a policy, depot to depot (policies only). */
  path?: PathPoint[];
}

/** Matrix over the model's depot (index 0) and `stops` (node ids), metres; Infinity where no walk joins two. O(k²). */
export function tripMatrixOf(model: SiteModel, stops: readonly number[]): DistanceMatrix {
  return tripMatrix(model.index, [model.depotNode, ...stops]);
}

/**
 * Routes one trip (`stops`: distinct access-point nodes, the depot not among them) by `method`. Tour
 * methods solve the depot + stops matrix; `exact` answers null above 16 stops. Policies walk the block
 * layout from the depot's point on the front cross aisle, and add the depot's link to it twice. Cost:
 * the method's (../tour/README.md, ../policy) plus O(k²) for the matrix when it is not given.
 */
export function routeTrip(model: SiteModel, stops: readonly number[], method: RouteMethod, options: RouteOptions = {}): TripRoute {
  if (isPolicyMethod(method)) {
    const layout = model.layout;
    if (isNotApplicable(layout)) return { length: null, visits: [], reason: layout.reason };
    const points: PolicyStop[] = [];
    for (const node of stops) {
      const s = model.stopOf(node);
      if (!s) return { length: null, visits: [], reason: `a stop (node ${node}) is not on the layout's aisles` };
      points.push(s);
    }
    const depot = layout.depots[0]!;
    const r: PolicyResult = POLICY_FNS[method](layout, depot.x, points);
    if (isNotApplicable(r)) return { length: null, visits: [], reason: r.reason };
    const d = model.geometry.depots[model.depotIdx]!;
    return { length: r.length + 2 * depot.offset, visits: r.order, reason: null, path: [{ x: d.x, y: d.y }, ...r.path, { x: d.x, y: d.y }] };
  }
  const m = options.matrix ?? tripMatrixOf(model, stops);
  let construction: TourMethod;
  let improve: ImproveMode;
  if (method === 'exact') {
    if (m.n > HELD_KARP_MAX_POINTS) return { length: null, visits: [], reason: `more than ${HELD_KARP_MAX_POINTS - 1} stops` };
    construction = 'exact';
    improve = 'none';
  } else {
    [construction, improve] = method.split('+') as [TourMethod, ImproveMode];
  }
  const limit = options.timeLimitMs ?? DEFAULT_TIME_LIMIT_MS;
  const clock = options.clock ?? (() => defaultClock);
  const r = solveTour(m, {
    method: construction,
    improve,
    clock: clock(),
    timeLimitMs: improve === 'deep' ? (options.deepTimeLimitMs ?? limit) : limit,
    seed: options.seed ?? 1,
  });
  if (options.restartFromSShape && !isNotApplicable(model.layout)) {
    const s = routeTrip(model, stops, 's-shape');
    const better = s.length !== null ? improveFromVisits(m, r.length, s.visits) : null;
    if (better) return { length: better.length, visits: better.order.slice(1).map((k) => k - 1), reason: null };
  }
  return { length: r.length, visits: r.order.slice(1).map((k) => k - 1), reason: null };
}
