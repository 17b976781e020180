import { loadPlanIndex } from '../floor-plans/plan-index';
import { depotNodeOf, distanceOf, getWaveRow, splitStops, stopsOf, type DbTripRow, type Q } from './picking.repository';
import { closedWalkMetres } from './route-math';

/** Metres walked on a trip: depot → finished stops in the order finished → depot, on the plan's distances. */
export async function walkedMetres(db: Q, trip: DbTripRow): Promise<number> {
  const wave = (await getWaveRow(db, trip.wave_id))!;
  const plan = await loadPlanIndex(db, wave.plan_id);
  const { done } = splitStops(await stopsOf(db, trip.id));
  return closedWalkMetres(depotNodeOf(plan, wave), done.map((s) => s.node), distanceOf(plan));
}
