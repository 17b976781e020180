/**
 * Warehouse routing policies on parallel-aisle layouts and Ratliff & Rosenthal's exact optimum for a
 * single block. Entry: `toBlockLayout(plan)` (or `blockLayoutOf(numbers)`), then any policy with the
 * depot's x on the front cross aisle and the stops as (aisle index, plan y).
 */
export type { BlockDepot, BlockLayout, BlockLayoutParams, ToBlockLayoutOptions } from './layout';
export { aisleLength, blockLayoutOf, depthOf, stopOfBin, toBlockLayout, yOfDepth } from './layout';
export type { PolicyOptions } from './policies';
export { combined, largestGap, midpoint, POLICIES, returnPolicy, sShape } from './policies';
export type { RatliffRosenthalOptions } from './ratliff-rosenthal';
export { ratliffRosenthal } from './ratliff-rosenthal';
export type { NotApplicable, PathPoint, PolicyName, PolicyResult, PolicyRoute, PolicyStop } from './types';
export { isNotApplicable, POLICY_NAMES } from './types';
