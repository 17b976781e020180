/**
 * The site model and what runs on it: `buildSiteModel` once per plan, `slotOrders` to put order lines
 * on its access points, `routeTrip` to route a trip by any method, and the walk figures of ./walk.ts.
 */
export { buildSiteModel, SiteModelError, type SiteModel, type SiteModelInput } from './model';
export { slotOrders, slotProblem, slotReason, type SlotLine, type SlotOrder, type SlotProblem, type Unslotted } from './slot';
export { isPolicyMethod, routeTrip, tripMatrixOf, type RouteMethod, type RouteOptions, type TripRoute } from './route';
export { closedWalkMetres, remainingMetres, resequenceFree, RESEQUENCE_BUDGET_MS, walkPolyline, type Distance } from './walk';
