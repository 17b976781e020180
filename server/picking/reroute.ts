/**
 * The walking order of a trip's remaining stops: after "Skip for now", and after a closure change on
 * the trip's floor plan (the walk graph changed under a trip being picked). Printed stop numbers never
 * change; only `stops.walk_seq` does. Stops no walk reaches from where the picker is (or back to the
 * depot) are cut off: they go last, and the tablet and the board say so.
 */
import type { Q } from '../db/knex';
import type { Knex } from 'knex';
import { audit } from '../audit/audit';
import { loadPlanIndex, type LoadedPlan } from '../floor-plans/plan-index';
import { siteChanged } from './events';
import {
  bumpRevision,
  depotNodeOf,
  distanceOf,
  getTripRow,
  getWaveRow,
  linesOf,
  markRouteChanged,
  OPEN_TRIP,
  openTripIdsOnPlan,
  pickerNode,
  setWalkSeq,
  splitStops,
  stopsOf,
  walkOrder,
  walkedStopIds,
  type DbStopRow,
} from './picking.repository';
import { resequenceFree, type Distance } from './route-math';

/** True when a walk joins `from` to the stop and the stop back to the depot. */
export const canReach = (dist: Distance, from: number, node: number, depot: number): boolean =>
  Number.isFinite(dist(from, node)) && Number.isFinite(dist(node, depot));

/**
 * Order of the open stops: reachable ones not skipped re-sequenced as an open walk from `from` to the
 * first skipped stop (or the depot), then the skipped ones in skip order (`lastSkipped` last on a tie),
 * then the cut-off ones in their former order.
 */
export function orderRemaining(
  open: readonly DbStopRow[],
  from: number,
  depot: number,
  dist: Distance,
  lastSkipped: number | null = null,
): { walk: DbStopRow[]; cut: DbStopRow[] } {
  const reach = open.filter((s) => canReach(dist, from, s.node, depot));
  const cut = open.filter((s) => !canReach(dist, from, s.node, depot)).sort((a, b) => walkOrder(a) - walkOrder(b) || a.n - b.n);
  const tail = reach
    .filter((s) => s.skipped_at !== null)
    .sort((a, b) => a.skipped_at!.localeCompare(b.skipped_at!) || (a.id === lastSkipped ? 1 : b.id === lastSkipped ? -1 : a.n - b.n));
  const free = reach.filter((s) => s.skipped_at === null);
  const order = resequenceFree(
    free.map((s) => s.node),
    from,
    tail.length ? tail[0]!.node : depot,
    dist,
  );
  return { walk: [...order.map((i) => free[i]!), ...tail], cut };
}

/** Stores the walking order: finished stops in the order finished, then `rest`. */
export async function writeWalkOrder(trx: Q, done: readonly DbStopRow[], rest: readonly DbStopRow[]): Promise<void> {
  let seq = 0;
  for (const s of [...done, ...rest]) {
    seq += 1;
    if (s.walk_seq !== seq) await setWalkSeq(trx, s.id, seq);
  }
}

/** Metres of each leg from `from` through `nodes` and back to the depot (Infinity where no walk). */
function legs(from: number, nodes: readonly number[], depot: number, dist: Distance): number[] {
  const out: number[] = [];
  let at = from;
  for (const n of nodes) {
    out.push(dist(at, n));
    at = n;
  }
  out.push(dist(at, depot));
  return out;
}

const sameLegs = (a: number[], b: number[]) => a.length === b.length && a.every((v, i) => v === b[i] || Math.abs(v - b[i]!) < 1e-6);

export interface RerouteOutcome {
  tripId: number;
  cutOffStops: number[];
}

/**
 * After a closure change on a plan: every open trip on it whose remaining walk changed (a leg longer,
 * shorter or gone) gets its remaining stops re-routed from where the picker is; cut-off stops go last.
 * `before` is the plan as loaded before the change. Each trip is its own transaction and audit entry;
 * one trip failing leaves the others re-routed (and the board and tablet still show cut-off stops,
 * which they compute on every read).
 */
export async function rerouteOpenTrips(db: Knex, planId: number, before: LoadedPlan, userId: number | null): Promise<RerouteOutcome[]> {
  const plan = await loadPlanIndex(db, planId);
  if (plan === before) return [];
  const tripIds = await openTripIdsOnPlan(db, planId);
  const out: RerouteOutcome[] = [];
  const sites = new Set<number>();
  for (const id of tripIds) {
    try {
      const r = await db.transaction(async (trx) => {
        const trip = await getTripRow(trx, id);
        if (!trip || !(OPEN_TRIP as readonly string[]).includes(trip.status)) return null;
        const wave = (await getWaveRow(trx, trip.wave_id))!;
        const depot = depotNodeOf(plan, wave);
        const stops = await stopsOf(trx, id);
        const { done, open } = splitStops(stops);
        if (open.length === 0) return null;
        const from = pickerNode(done, depot, walkedStopIds(await linesOf(trx, id)));
        const nodes = open.map((s) => s.node);
        if (sameLegs(legs(from, nodes, depotNodeOf(before, wave), distanceOf(before)), legs(from, nodes, depot, distanceOf(plan)))) return null;
        const { walk, cut } = orderRemaining(open, from, depot, distanceOf(plan));
        await writeWalkOrder(trx, done, [...walk, ...cut]);
        const at = new Date().toISOString();
        await markRouteChanged(trx, id, at);
        await bumpRevision(trx, id);
        await audit(trx, {
          siteId: trip.site_id,
          userId,
          action: 'trip.reroute',
          subject: `trip:${id}`,
          detail: {
            planId,
            closureVersion: plan.closureVersion,
            from,
            orderBefore: open.map((s) => s.n),
            orderAfter: walk.map((s) => s.n),
            cutOffStops: cut.map((s) => s.n),
          },
        });
        sites.add(trip.site_id);
        return { tripId: id, cutOffStops: cut.map((s) => s.n) };
      });
      if (r) out.push(r);
    } catch {
      // Left as it was: reads still mark its cut-off stops; the next closure change tries again.
    }
  }
  for (const s of sites) siteChanged(s);
  return out;
}
