/**
 * Shapes shared by the warehouse routing policies. Units are metres; x is across the aisles and y along
 * them, in the plan's own coordinates (see ../plan/types.ts).
 */

/** A stop on a parallel-aisle layout: aisle index into `BlockLayout.aisleX`, plan y along that aisle. */
export interface PolicyStop {
  aisle: number;
  y: number;
}

export interface PathPoint {
  x: number;
  y: number;
}

export const POLICY_NAMES = ['s-shape', 'return', 'midpoint', 'largest-gap', 'combined', 'ratliff-rosenthal'] as const;
export type PolicyName = (typeof POLICY_NAMES)[number];

export interface PolicyRoute {
  method: PolicyName;
  /** Indices into the stops array, in visiting order; each index exactly once. */
  order: number[];
  /**
   * Metres walked from the depot's point on the front cross aisle and back, aisle and cross-aisle travel
   * included. The leg from the depot itself to the front cross aisle (`BlockDepot.offset`, twice) is not.
   */
  length: number;
  /**
   * The walk as an axis-parallel polyline in plan coordinates, from the depot's point on the front cross
   * aisle back to it; it passes through every stop (a stop's point is a vertex of the polyline).
   */
  path: PathPoint[];
  /** Compute time, milliseconds. */
  ms: number;
}

/** Why a policy does not apply to this layout or these stops. */
export interface NotApplicable {
  reason: string;
}

export type PolicyResult = PolicyRoute | NotApplicable;

export function isNotApplicable<T extends object>(r: T | NotApplicable): r is NotApplicable {
  return 'reason' in r;
}
