/**
 * The supervisor's live board: one snapshot of every wave in progress (and those finished in the
 * last shift), and the supervisor's actions on it: assign or reassign a trip, cancel the rest of a
 * trip (its open lines go back to open orders), close a wave, mark a short handled.
 */
import type { Q } from '../db/knex';
import type { Knex } from 'knex';
import type { Board, BoardCutOffLine, BoardTrip, BoardWave } from '../../shared/picking';
import { audit } from '../audit/audit';
import { AppError, notFound } from '../http/errors';
import type { Mailer } from '../mail/mailer';
import { getSiteRow, settingsOf } from '../sites/sites.repository';
import { loadPlanIndex } from '../floor-plans/plan-index';
import { estimateMinutes } from '../waves/wave-planner';
import { tripHead } from '../waves/waves.repository';
import { siteChanged } from './events';
import * as repo from './picking.repository';
import { bumpRevision, depotNodeOf, distanceOf, finiteOrNull, pickerNode, splitStops, walkedStopIds, type DbTripRow } from './picking.repository';
import { remainingMetres } from './route-math';
import { canReach } from './reroute';
import { walkedMetres } from './walked';
import type { Actor } from './picking.service';
import { afterTripClosed, mailWaveReport } from './waves-progress';

/** Finished waves stay on the board this long, so the end of a shift can still be read there. */
export const FINISHED_VISIBLE_MS = 8 * 3600_000;

const nowIso = () => new Date().toISOString();

export async function boardSnapshot(db: Knex, siteId: number, now = Date.now()): Promise<Board> {
  const site = await getSiteRow(db, siteId);
  if (!site) throw notFound('Site');
  const speeds = settingsOf(site);
  const since = new Date(now - FINISHED_VISIBLE_MS).toISOString();
  const waves = await repo.boardWaveRows(db, siteId, since);
  const { trips, stops, lines } = await repo.boardTripRows(
    db,
    waves.map((w) => w.id),
  );
  const cutOff: BoardCutOffLine[] = [];
  const stopsByTrip = groupBy(stops, (s) => s.trip_id);
  const linesByTrip = groupBy(lines, (l) => l.trip_id);

  const outWaves: BoardWave[] = [];
  for (const w of waves) {
    const plan = await loadPlanIndex(db, w.plan_id);
    const dist = distanceOf(plan);
    const depot = depotNodeOf(plan, w);
    const boardTrips: BoardTrip[] = trips
      .filter((t) => t.wave_id === w.id)
      .map((t) => {
        const ss = stopsByTrip.get(t.id) ?? [];
        const ls = linesByTrip.get(t.id) ?? [];
        const { done, open } = splitStops(ss);
        const openLines = ls.filter((l) => l.status === 'open').length;
        const closed = t.status === 'done' || t.status === 'cancelled';
        const from = pickerNode(done, depot, walkedStopIds(ls));
        // Stops a closure cut off are left out of the walk and listed for the supervisor.
        const reach = closed ? open : open.filter((s) => canReach(dist, from, s.node, depot));
        const cutStops = new Map(closed ? [] : open.filter((s) => !reach.includes(s)).map((s) => [s.id, s.n]));
        const cutLines = ls.filter((l) => l.status === 'open' && cutStops.has(l.stop_id));
        for (const l of cutLines) {
          cutOff.push({
            lineId: l.id,
            waveId: w.id,
            waveName: w.name,
            tripId: t.id,
            tripN: t.n,
            stopN: cutStops.get(l.stop_id)!,
            pickerName: t.picker_name,
            orderRef: l.order_ref,
            sku: l.sku,
            bin: l.bin,
            qty: l.qty,
          });
        }
        const metres = closed
          ? 0
          : (finiteOrNull(
              remainingMetres(
                from,
                reach.map((s) => s.node),
                depot,
                dist,
              ),
            ) ?? 0);
        const end = t.finished_at ? Date.parse(t.finished_at) : now;
        return {
          ...tripHead(t),
          stops: ss.length,
          stopsDone: done.length,
          lines: ls.length,
          linesDone: ls.length - openLines,
          shorts: ls.filter((l) => l.status === 'short').length,
          startedAt: t.started_at,
          finishedAt: t.finished_at,
          elapsedMinutes: t.started_at ? finiteOrNull((end - Date.parse(t.started_at)) / 60_000) : null,
          remainingMinutes: closed ? 0 : (finiteOrNull(estimateMinutes(metres, openLines - cutLines.length, reach.length, speeds)) ?? 0),
          cutOffLines: cutLines.length,
          estMinutes: finiteOrNull(t.est_seconds / 60) ?? 0,
        };
      });
    const remaining = boardTrips.reduce((a, t) => a + t.remainingMinutes, 0);
    const pickers = new Set(boardTrips.filter((t) => (t.status === 'assigned' || t.status === 'picking') && t.pickerId !== null).map((t) => t.pickerId));
    const pickersCounted = Math.max(1, pickers.size);
    outWaves.push({
      id: w.id,
      name: w.name,
      status: w.status,
      trips: boardTrips,
      lines: boardTrips.reduce((a, t) => a + t.lines, 0),
      linesDone: boardTrips.reduce((a, t) => a + t.linesDone, 0),
      shorts: boardTrips.reduce((a, t) => a + t.shorts, 0),
      remainingMinutes: remaining,
      pickersCounted,
      forecastAt: remaining > 0 && Number.isFinite(remaining) ? new Date(now + (remaining / pickersCounted) * 60_000).toISOString() : null,
    });
  }

  const shorts = await repo.unhandledShorts(db, siteId);
  const pickers = await repo.sitePickersWithTrip(db, siteId);
  return { siteId, at: new Date(now).toISOString(), waves: outWaves, shorts, cutOff, pickers };
}

function groupBy<T>(items: T[], key: (t: T) => number): Map<number, T[]> {
  const m = new Map<number, T[]>();
  for (const it of items) {
    const k = key(it);
    const list = m.get(k);
    if (list) list.push(it);
    else m.set(k, [it]);
  }
  return m;
}

async function siteTrip(db: Q, siteId: number, tripId: number): Promise<DbTripRow> {
  const trip = await repo.getSiteTripRow(db, siteId, tripId);
  if (!trip) throw notFound('Trip');
  return trip;
}

/** Gives a trip to a picker (first assignment or reassignment). The former picker's queued work still counts. */
export async function assignTrip(db: Knex, actor: Actor, siteId: number, tripId: number, pickerId: number): Promise<BoardTrip['id']> {
  await db.transaction(async (trx) => {
    const trip = await siteTrip(trx, siteId, tripId);
    if (!['released', 'assigned', 'picking'].includes(trip.status)) throw new AppError('conflict', 'trip_closed', `Trip ${trip.n} is ${trip.status}`);
    const picker = await repo.activeSitePicker(trx, siteId, pickerId);
    if (!picker)
      throw new AppError('validation', 'validation_failed', 'Choose an active picker of this site', [
        { field: 'pickerId', message: 'not an active picker of this site' },
      ]);
    if (trip.picker_id === pickerId) return;
    const busy = await repo.otherActiveTripOf(trx, siteId, pickerId, tripId);
    if (busy)
      throw new AppError('conflict', 'picker_busy', `${picker.name} already has trip ${busy.n}; finish, cancel or reassign it first`, { tripId: busy.id });
    const at = nowIso();
    await repo.reassignTripRow(trx, trip, pickerId, actor.id, at);
    await bumpRevision(trx, tripId);
    await audit(trx, {
      siteId,
      userId: actor.id,
      action: trip.picker_id === null ? 'trip.assign' : 'trip.reassign',
      subject: `trip:${tripId}`,
      detail: { from: trip.picker_id, to: pickerId },
      device: actor.device,
    });
  });
  siteChanged(siteId);
  return tripId;
}

/** Cancels the open lines of a trip inside a transaction; their orders go back to open orders. */
async function cancelRest(
  trx: Knex.Transaction,
  actor: Actor,
  trip: DbTripRow,
  reason: string | null,
): Promise<{ linesCancelled: number; ordersReopened: string[] }> {
  const at = nowIso();
  const open = await repo.cancelOpenLines(trx, trip.id);
  // Orders with nothing left in the cart go back to open; the lines picked stay picked on this trip.
  const refs = await repo.reopenOrders(trx, [...new Set(open.map((l) => l.order_id))]);
  const walked = await walkedMetres(trx, trip);
  await repo.closeTripCancelled(trx, trip, walked, at);
  await bumpRevision(trx, trip.id);
  await repo.endOpenAssignments(trx, trip.id, at);
  await audit(trx, {
    siteId: trip.site_id,
    userId: actor.id,
    action: 'trip.cancel',
    subject: `trip:${trip.id}`,
    detail: { reason, linesCancelled: open.length, ordersReopened: refs, picker: trip.picker_id },
    device: actor.device,
  });
  return { linesCancelled: open.length, ordersReopened: refs };
}

export async function cancelTrip(db: Knex, mailer: Mailer, actor: Actor, siteId: number, tripId: number, reason: string | null) {
  const out = await db.transaction(async (trx) => {
    const trip = await siteTrip(trx, siteId, tripId);
    if (trip.status === 'done' || trip.status === 'cancelled') throw new AppError('conflict', 'trip_closed', `Trip ${trip.n} is already ${trip.status}`);
    return { waveId: trip.wave_id, ...(await cancelRest(trx, actor, trip, reason)) };
  });
  siteChanged(siteId);
  await afterTripClosed(db, mailer, out.waveId);
  return { tripId, linesCancelled: out.linesCancelled, ordersReopened: out.ordersReopened };
}

/** Closes a wave: every trip not done is cancelled (open lines back to open orders); the report is mailed. */
export async function closeWave(db: Knex, mailer: Mailer, actor: Actor, siteId: number, waveId: number, reason: string | null) {
  const out = await db.transaction(async (trx) => {
    const wave = await repo.getSiteWaveRow(trx, siteId, waveId);
    if (!wave) throw notFound('Wave');
    if (wave.status === 'completed' || wave.status === 'cancelled')
      throw new AppError('conflict', 'wave_closed', `Wave ${wave.name} is already ${wave.status}`);
    const trips = await repo.unfinishedTripsOf(trx, waveId);
    let lines = 0;
    for (const t of trips) lines += (await cancelRest(trx, actor, t, reason ?? 'wave closed')).linesCancelled;
    await repo.completeWaveRow(trx, waveId, nowIso());
    await audit(trx, {
      siteId,
      userId: actor.id,
      action: 'wave.close',
      subject: `wave:${waveId}`,
      detail: { reason, tripsCancelled: trips.length, linesCancelled: lines },
      device: actor.device,
    });
    return { tripsCancelled: trips.length, linesCancelled: lines };
  });
  siteChanged(siteId);
  const mailed = await mailWaveReport(db, mailer, waveId);
  return { waveId, ...out, reportMailedTo: mailed };
}

export async function handleShort(db: Knex, actor: Actor, siteId: number, shortId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const row = await repo.getSiteShort(trx, siteId, shortId);
    if (!row) throw notFound('Short');
    if (row.handled_at) return;
    await repo.markShortHandled(trx, shortId, actor.id, nowIso());
    await audit(trx, { siteId, userId: actor.id, action: 'short.handled', subject: `line:${row.line_id}`, detail: { shortId }, device: actor.device });
  });
  siteChanged(siteId);
}
