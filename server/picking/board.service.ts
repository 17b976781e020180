/**
 * The supervisor's live board: one snapshot of every wave in progress (and those finished in the
 * last shift), and the supervisor's actions on it: assign or reassign a trip, cancel the rest of a
 * trip (its open lines go back to open orders), close a wave, mark a short handled.
 */
import type { Q } from '../db/knex';
import type { Knex } from 'knex';
import type { Board, BoardCutOffLine, BoardTrip, BoardWave, ReplenishmentItem, ShortFollowUp, ShortFollowUpResult } from '../../shared/picking';
import type { Table } from '../exports/table-export';
import { insertOrder, skuMap } from '../orders/orders.repository';
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
  const handledShorts = await repo.handledShortsSince(db, siteId, since);
  const pickers = await repo.sitePickersWithTrip(db, siteId);
  return { siteId, at: new Date(now).toISOString(), waves: outWaves, shorts, handledShorts, cutOff, pickers };
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
): Promise<{ linesCancelled: number; ordersReopened: string[]; remainderOrders: string[] }> {
  const at = nowIso();
  const open = await repo.cancelOpenLines(trx, trip.id);
  // Orders with nothing in the cart go back to open as they were. An order partly picked is done with
  // what the cart holds, and its cancelled lines become a new open order (`<ref>-R1`): reopening the
  // whole order would have the next wave pick its picked lines again.
  const touched = [...new Set(open.map((l) => l.order_id))];
  const started = new Set(await repo.ordersWithRecordedLines(trx, touched));
  const refs = await repo.reopenOrders(
    trx,
    touched.filter((id) => !started.has(id)),
  );
  const remainders: string[] = [];
  // A line whose SKU has left the SKU master since cannot be ordered again: named in the audit instead.
  const notCarried: { order: string; sku: string; qty: number }[] = [];
  const skus = started.size ? await skuMap(trx, trip.site_id) : new Map();
  for (const orderId of started) {
    const original = await repo.orderOfLine(trx, trip.site_id, orderId);
    const rest = open.filter((l) => l.order_id === orderId);
    for (const l of rest) if (!skus.has(l.sku)) notCarried.push({ order: l.order_ref, sku: l.sku, qty: l.qty });
    const lines = rest.filter((l) => skus.has(l.sku)).map((l) => ({ sku: l.sku, qty: l.qty }));
    if (!original || !lines.length) continue;
    remainders.push((await followOnOrder(trx, trip.site_id, original, lines, 'remainder', skus)).ref);
  }
  // Every order of the trip not reopened above is done: partly picked ones, and those picked in full
  // (they were left in "picking" before). The reopened ones are open again and stay so.
  await repo.markOrdersDone(trx, await repo.tripOrderIds(trx, trip.id));
  const walked = await walkedMetres(trx, trip);
  await repo.closeTripCancelled(trx, trip, walked, at);
  await bumpRevision(trx, trip.id);
  await repo.endOpenAssignments(trx, trip.id, at);
  await audit(trx, {
    siteId: trip.site_id,
    userId: actor.id,
    action: 'trip.cancel',
    subject: `trip:${trip.id}`,
    detail: {
      reason,
      linesCancelled: open.length,
      ordersReopened: refs,
      remainderOrders: remainders,
      ...(notCarried.length ? { notCarried } : {}),
      picker: trip.picker_id,
    },
    device: actor.device,
  });
  return { linesCancelled: open.length, ordersReopened: refs, remainderOrders: remainders };
}

export async function cancelTrip(db: Knex, mailer: Mailer, actor: Actor, siteId: number, tripId: number, reason: string | null) {
  const out = await db.transaction(async (trx) => {
    const trip = await siteTrip(trx, siteId, tripId);
    if (trip.status === 'done' || trip.status === 'cancelled') throw new AppError('conflict', 'trip_closed', `Trip ${trip.n} is already ${trip.status}`);
    return { waveId: trip.wave_id, ...(await cancelRest(trx, actor, trip, reason)) };
  });
  siteChanged(siteId);
  await afterTripClosed(db, mailer, out.waveId);
  return { tripId, linesCancelled: out.linesCancelled, ordersReopened: out.ordersReopened, remainderOrders: out.remainderOrders };
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

const FOLLOW_UP_WORDS: Record<ShortFollowUp, string> = {
  handled: 'marked handled',
  repick: 'sent to re-pick',
  replenish: 'sent to the replenishment list',
};

/** The longest order reference (input rules: codes up to 64 characters). */
const MAX_REF = 64;

/** `<original>-R1`, `-R2`, … : the first reference not taken on the site, cut to fit 64 characters. */
async function repickRef(db: Q, siteId: number, original: string): Promise<string> {
  const taken = new Set(await repo.orderRefsStartingWith(db, siteId, original.slice(0, MAX_REF - 4)));
  for (let k = 1; ; k++) {
    const suffix = `-R${k}`;
    const ref = `${original.slice(0, MAX_REF - suffix.length)}${suffix}`;
    if (!taken.has(ref)) return ref;
  }
}

/**
 * A new open order `<original>-R1` (the next free number) holding `lines`, due and ranked like the
 * original, so the wave builder offers it like any open order: a short re-picked, or the rest of a
 * partly picked order whose trip was cancelled.
 */
async function followOnOrder(
  trx: Knex.Transaction,
  siteId: number,
  original: { ref: string; due: string | null; priority: number | null },
  lines: { sku: string; qty: number }[],
  source: 'repick' | 'remainder',
  skus: Awaited<ReturnType<typeof skuMap>>,
): Promise<{ id: number; ref: string }> {
  const ref = await repickRef(trx, siteId, original.ref);
  const id = await insertOrder(trx, siteId, { ref, due: original.due, priority: original.priority, lines, row: null }, source, skus);
  return { id, ref };
}

/**
 * The supervisor's follow-up on a short: mark it handled, re-pick the quantity not found in a later
 * wave (a new open order `<original>-R1` with that one line, keeping the original's due time and
 * priority, so the wave builder offers it like any open order), or send it to the replenishment list.
 * The short leaves the attention list; the board lists it with the follow-up for the rest of the shift.
 * Asking again for the follow-up already chosen answers the same (a double click makes one order);
 * another follow-up is refused (409 short_already_handled).
 */
export async function followUpShort(db: Knex, actor: Actor, siteId: number, shortId: number, followUp: ShortFollowUp): Promise<ShortFollowUpResult> {
  const out = await db.transaction(async (trx): Promise<ShortFollowUpResult> => {
    const row = await repo.getSiteShort(trx, siteId, shortId);
    if (!row) throw notFound('Short');
    if (row.handled_at) {
      const chosen = row.follow_up ?? 'handled';
      if (chosen !== followUp)
        throw new AppError('conflict', 'short_already_handled', `This short was already ${FOLLOW_UP_WORDS[chosen]}`, { followUp: chosen });
      const order = row.repick_order_id ? await repo.orderOfLine(trx, siteId, row.repick_order_id) : undefined;
      return { shortId, followUp, repickOrder: order ? { id: order.id, ref: order.ref } : null };
    }
    const line = (await repo.getLineRow(trx, row.line_id))!;
    const qtyShort = row.qty_ordered - row.qty_found;
    let repickOrder: ShortFollowUpResult['repickOrder'] = null;
    if (followUp === 'repick') {
      if (qtyShort < 1) throw new AppError('conflict', 'nothing_to_repick', 'Everything ordered on this line was found: there is nothing to re-pick');
      const original = await repo.orderOfLine(trx, siteId, line.order_id);
      if (!original) throw notFound('Order');
      const skus = await skuMap(trx, siteId);
      if (!skus.has(line.sku))
        throw new AppError(
          'unprocessable',
          'unknown_sku',
          `SKU ${line.sku} is no longer in the SKU master: import it again, or send the short to the replenishment list`,
          { sku: line.sku },
        );
      repickOrder = await followOnOrder(trx, siteId, original, [{ sku: line.sku, qty: qtyShort }], 'repick', skus);
    }
    await repo.markShortHandled(trx, shortId, actor.id, nowIso(), followUp, repickOrder?.id ?? null);
    await audit(trx, {
      siteId,
      userId: actor.id,
      action: followUp === 'handled' ? 'short.handled' : followUp === 'repick' ? 'short.repick' : 'short.replenish',
      subject: `line:${row.line_id}`,
      detail: { shortId, sku: line.sku, bin: line.bin, order: line.order_ref, qtyShort, ...(repickOrder ? { repickOrder: repickOrder.ref } : {}) },
      device: actor.device,
    });
    return { shortId, followUp, repickOrder };
  });
  siteChanged(siteId);
  return out;
}

export async function handleShort(db: Knex, actor: Actor, siteId: number, shortId: number): Promise<void> {
  await followUpShort(db, actor, siteId, shortId, 'handled');
}

/** The replenishment list's "Restocked": the entry leaves the open list (audited; a second call changes nothing). */
export async function markRestocked(db: Knex, actor: Actor, siteId: number, shortId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const row = await repo.getSiteShort(trx, siteId, shortId);
    if (!row || row.follow_up !== 'replenish') throw notFound('Replenishment entry');
    if (row.restocked_at) return;
    await repo.markShortRestocked(trx, shortId, actor.id, nowIso());
    await audit(trx, { siteId, userId: actor.id, action: 'short.restocked', subject: `line:${row.line_id}`, detail: { shortId }, device: actor.device });
  });
}

export const replenishmentList = (db: Q, siteId: number, show: 'open' | 'all'): Promise<ReplenishmentItem[]> =>
  repo.replenishmentRows(db, siteId, show === 'all');

/** The replenishment list as one table for the xlsx and CSV downloads. */
export function replenishmentTable(items: readonly ReplenishmentItem[]): Table {
  return {
    name: 'replenishment',
    header: [
      'sku',
      'description',
      'bin',
      'qty_short',
      'reason',
      'reported_at',
      'reported_by',
      'order',
      'wave',
      'trip',
      'sent_at',
      'sent_by',
      'restocked_at',
      'restocked_by',
    ],
    rows: items.map((i) => [
      i.sku,
      i.description,
      i.bin,
      i.qtyShort,
      i.reason,
      i.reportedAt,
      i.reportedBy,
      i.orderRef,
      i.waveName,
      i.tripN,
      i.sentAt,
      i.sentBy,
      i.restockedAt,
      i.restockedBy,
    ]),
  };
}
