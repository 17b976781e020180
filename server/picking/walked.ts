import type { Q } from '../db/knex';
import { loadPlanIndex } from '../floor-plans/plan-index';
import { depotNodeOf, distanceOf, finiteOrNull, getWaveRow, linesOf, splitStops, stopsOf, walkedStopIds, type DbTripRow } from './picking.repository';
import { closedWalkMetres } from './route-math';

/**
 * Metres walked on a trip: depot → finished stops in the order finished → depot, on the plan's
 * distances. A stop settled only as "cannot reach" was not walked to and is left out. Null when no
 * walk joins the stops on the plan as it is now (a closure cut one off after it was picked): the
 * figure is then not measurable, never Infinity.
 */
export async function walkedMetres(db: Q, trip: DbTripRow): Promise<number | null> {
  const wave = (await getWaveRow(db, trip.wave_id))!;
  const plan = await loadPlanIndex(db, wave.plan_id);
  const walked = walkedStopIds(await linesOf(db, trip.id));
  const { done } = splitStops(await stopsOf(db, trip.id));
  return finiteOrNull(
    closedWalkMetres(
      depotNodeOf(plan, wave),
      done.filter((s) => walked.has(s.id)).map((s) => s.node),
      distanceOf(plan),
    ),
  );
}
