/**
 * The picker's side: take a trip, confirm, short, skip, return to the depot. Every write runs in one
 * transaction with its idempotency record and audit entry, so the answer is sent only after SQLite
 * has committed it (synchronous=FULL on every connection, server/db/knex.ts).
 */
import * as repo from './picking.repository';
import type { Q } from '../db/knex';
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { Role } from '../../shared/common';
import {
  UNDO_WINDOW_MS,
  type CartReadyBody,
  type ConfirmBody,
  type LineAnswer,
  type PickTrip,
  type ShortBody,
  type SkipBody,
  type TripPulse,
  type TripResult,
} from '../../shared/picking';
import { audit, type AuditEntry } from '../audit/audit';
import type { Mailer } from '../mail/mailer';
import { AppError, invalid, notFound } from '../http/errors';
import { loadPlanIndex } from '../floor-plans/plan-index';
import { siteChanged } from './events';
import {
  bumpRevision,
  depotNodeOf,
  distanceOf,
  finiteOrNull,
  getTripRow,
  getWaveRow,
  lineView,
  linesOf,
  loadPickTrip,
  pickerNode,
  splitStops,
  stopsOf,
  type DbLineRow,
  type DbTripRow,
  walkedStopIds,
} from './picking.repository';
import { groupCommit } from './group-commit';
import { orderRemaining, writeWalkOrder } from './reroute';
import { lockForTransaction } from '../db/dialect';
import { walkedMetres } from './walked';
import { afterTripClosed } from './waves-progress';

export interface Actor {
  id: number;
  name: string;
  role: Role;
  siteIds: number[];
  /** The tablet's own name (header) or its user agent, for the audit trail. */
  device: string | null;
}

/** A tablet clock may run this far ahead of the server's; work stamped within it still counts. */
export const CLOCK_SKEW_MS = 120_000;
/**
 * Two tap confirmations of different lines on one trip closer than this (by the tablet's clock) are a
 * double tap, not two picks: nobody walks to, picks and confirms a line in half a second (common practice
 * for touch debouncing is 300–500 ms). The tablet holds taps for the same time after every advance.
 */
export const TAP_GUARD_MS = 500;

const nowIso = () => new Date().toISOString();

function notYourTrip(): AppError {
  return new AppError('forbidden', 'not_your_trip', 'This trip is assigned to another picker');
}

/** Trip the actor may read: theirs now. 404 for no such trip; 403 for another picker's. */
export async function readableTrip(db: Q, actor: Actor, tripId: number): Promise<DbTripRow> {
  const trip = await getTripRow(db, tripId);
  if (!trip || (actor.role !== 'admin' && !actor.siteIds.includes(trip.site_id))) throw notFound('Trip');
  if (trip.picker_id !== actor.id) throw notYourTrip();
  return trip;
}

/** Trip the actor may send work for: theirs now, or theirs before a reassignment (queued work). */
async function writableTrip(db: Q, actor: Actor, tripId: number): Promise<{ trip: DbTripRow; formerUntil: string | null }> {
  const trip = await getTripRow(db, tripId);
  if (!trip || (actor.role !== 'admin' && !actor.siteIds.includes(trip.site_id))) throw notFound('Trip');
  if (trip.picker_id === actor.id) return { trip, formerUntil: null };
  const formerUntil = await repo.formerAssignmentEnd(db, tripId, actor.id);
  if (formerUntil === null) throw notYourTrip();
  return { trip, formerUntil };
}

/** The tablet's poll: status and revision of its trip, one row read. */
export async function tripPulse(db: Q, actor: Actor, tripId: number): Promise<TripPulse> {
  const trip = await readableTrip(db, actor, tripId);
  return { id: trip.id, status: trip.status, revision: trip.revision };
}

export async function getPickTrip(db: Q, actor: Actor, tripId: number): Promise<PickTrip> {
  await readableTrip(db, actor, tripId);
  return (await loadPickTrip(db, tripId))!;
}

const { activeTripOf, releasedTripCount: releasedCount } = repo;

/** The picker's trip at this site, if any, and how many released trips wait to be taken. */
export async function currentTrip(db: Q, actor: Actor, siteId: number): Promise<{ trip: PickTrip | null; releasedTrips: number }> {
  const mine = await activeTripOf(db, actor.id, siteId);
  return { trip: mine ? await loadPickTrip(db, mine.id) : null, releasedTrips: await releasedCount(db, siteId) };
}

/**
 * The picker's assigned trip, else the next released one, oldest due first (no due date last, then
 * the older wave, then trip number). The claim is one conditional UPDATE inside a transaction, so two
 * pickers never get the same trip.
 */
export async function takeNextTrip(db: Knex, actor: Actor, siteId: number): Promise<{ trip: PickTrip | null; releasedTrips: number }> {
  const tripId = await db.transaction(async (trx) => {
    const mine = await activeTripOf(trx, actor.id, siteId);
    if (mine) return mine.id;
    for (let attempt = 0; attempt < 5; attempt++) {
      const next = await repo.nextReleasedTripId(trx, siteId);
      if (next === undefined) return null;
      if (!(await repo.claimTrip(trx, next, actor.id, nowIso()))) continue;
      await bumpRevision(trx, next);
      await audit(trx, { siteId, userId: actor.id, action: 'trip.take', subject: `trip:${next}`, detail: { tripId: next }, device: actor.device });
      return next;
    }
    return null;
  });
  if (tripId !== null) siteChanged(siteId);
  return { trip: tripId === null ? null : await loadPickTrip(db, tripId), releasedTrips: await releasedCount(db, siteId) };
}

/** Starts the clock on a trip (after the safety caution); a second call changes nothing. */
export async function startTrip(db: Knex, actor: Actor, tripId: number): Promise<PickTrip> {
  const started = await db.transaction(async (trx) => {
    const trip = await readableTrip(trx, actor, tripId);
    if (trip.status !== 'assigned') return false;
    await markStarted(trx, trip);
    await tripChanged(trx, actor, trip, { action: 'trip.start', subject: `trip:${trip.id}` });
    return true;
  });
  const trip = (await loadPickTrip(db, tripId))!;
  if (started) siteChanged(trip.siteId);
  return trip;
}

/**
 * Cart set-up: the picker confirmed every tote of the trip (scan of its label or a tap) before the
 * first stop. Stored once with an audit entry; a second call (a reload, a resend) changes nothing.
 */
export async function cartReady(db: Knex, actor: Actor, tripId: number, body: CartReadyBody): Promise<PickTrip> {
  const changed = await db.transaction(async (trx) => {
    const trip = await readableTrip(trx, actor, tripId);
    if (trip.cart_ready_at) return false;
    if (trip.status !== 'picking')
      throw new AppError(
        'conflict',
        'trip_not_started',
        trip.status === 'assigned' ? 'Start the trip (safety caution) before setting up the cart' : 'This trip is closed',
      );
    const totes = await repo.totesOfTrip(trx, trip.id);
    const sent = [...new Set(body.totes.map((t) => t.tote))].sort((a, b) => a - b);
    const missing = totes.filter((t) => !sent.includes(t));
    const unknown = sent.filter((t) => !totes.includes(t));
    if (missing.length > 0 || unknown.length > 0 || sent.length !== body.totes.length) {
      throw new AppError('validation', 'totes_mismatch', `Confirm each tote of this trip once (totes ${totes.join(', ')})`, {
        expected: totes,
        missing,
        unknown,
      });
    }
    await repo.setCartReady(trx, trip.id, nowIso());
    await tripChanged(trx, actor, trip, { action: 'trip.cart_ready', subject: `trip:${trip.id}`, detail: { totes: body.totes } });
    return true;
  });
  const trip = (await loadPickTrip(db, tripId))!;
  if (changed) siteChanged(trip.siteId);
  return trip;
}

async function markStarted(trx: Q, trip: DbTripRow, firstWork?: string): Promise<void> {
  if (trip.status === 'picking' && trip.started_at) return;
  const at = trip.started_at ?? firstWork ?? nowIso();
  await repo.markTripStarted(trx, trip, at);
  trip.status = 'picking';
  trip.started_at = at;
}

/** A picker's change to a trip: its revision moves on (tablet and board reload) and the audit log says who, where and what. */
async function tripChanged(
  trx: Q,
  actor: Actor,
  trip: Pick<DbTripRow, 'id' | 'site_id'>,
  entry: Pick<AuditEntry, 'action' | 'subject' | 'detail'>,
): Promise<void> {
  await bumpRevision(trx, trip.id);
  await audit(trx, { siteId: trip.site_id, userId: actor.id, device: actor.device, ...entry });
}

// ---- idempotent writes ----

export interface KeyedRequest {
  key: string | undefined;
  method: string;
  path: string;
  body: unknown;
}

function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    return `{${Object.keys(o)
      .filter((k) => o[k] !== undefined)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(v ?? null);
}

export const requestHash = (r: KeyedRequest): string =>
  createHash('sha256')
    .update(`${r.method.toUpperCase()} ${r.path}\n${canonical(r.body)}`)
    .digest('hex');

interface WriteOutcome<T> {
  answer: T;
  /** Site to signal and trip closed by this write (wave completion runs after commit). */
  siteId: number;
  closedTripWave?: number;
}

/**
 * Runs one picker write under its idempotency key. Same key, same request → the stored answer; same
 * key, another request → 422; no key → 400. The record, the change and its audit entry commit together
 * (in a group commit with writes arriving at the same time), before the answer.
 */
async function idempotent<T>(
  db: Knex,
  actor: Actor,
  tripId: number,
  req: KeyedRequest,
  pickedAt: string | undefined,
  run: (trx: Knex.Transaction, trip: DbTripRow) => Promise<WriteOutcome<T>>,
  mailer?: Mailer,
): Promise<T> {
  if (!req.key) {
    // Access first: another picker's trip is 403 whatever else is wrong with the request.
    await writableTrip(db, actor, tripId);
    throw new AppError('validation', 'idempotency_key_required', 'Send an Idempotency-Key header with every picking request', [
      { field: 'Idempotency-Key', message: 'required' },
    ]);
  }
  if (!/^[A-Za-z0-9_-]{8,64}$/.test(req.key)) {
    await writableTrip(db, actor, tripId);
    throw invalid('Invalid Idempotency-Key', [{ field: 'Idempotency-Key', message: '8–64 letters, digits, - or _' }]);
  }
  const hash = requestHash(req);
  const key = req.key;
  const out = await groupCommit(db).run(async (trx) => {
    // Writes to one trip one at a time (SQLite's one connection does this by itself; on PostgreSQL each
    // write has its own transaction): a repeated key or two pickers on one line see the first one's result.
    await lockForTransaction(trx, `trip:${tripId}`);
    // Keys are per user: a stored answer goes back only to the picker who made it. The trip lock does
    // not cover one key sent to two trips (a picker's own trip and one taken from them), so the key has
    // a lock too, always taken after the trip's (no cycle): the second sees the first's record and is
    // refused as a reused key (422), never a UNIQUE-index crash (500). Keys stay per user, not per
    // trip: the tablet makes a fresh key per action, so one key on two trips is a mistake to refuse.
    await lockForTransaction(trx, `pick-key:${actor.id}:${key}`);
    const stored = await repo.storedRequest(trx, actor.id, key);
    if (stored) {
      if (stored.request_hash !== hash) {
        throw new AppError('unprocessable', 'idempotency_key_reused', 'This Idempotency-Key was already used for a different request');
      }
      return { replay: true as const, answer: JSON.parse(stored.response) as T };
    }
    const { trip, formerUntil } = await writableTrip(trx, actor, tripId);
    if (formerUntil !== null) {
      // A former picker's queued work counts only if it was done before the trip was taken from them.
      const done = pickedAt ? Date.parse(pickedAt) : NaN;
      if (!(done <= Date.parse(formerUntil))) {
        throw new AppError('forbidden', 'trip_reassigned', 'This trip was given to another picker', { until: formerUntil });
      }
    }
    const outcome = await run(trx, trip);
    await repo.storeRequest(trx, {
      user_id: actor.id,
      idem_key: key,
      request_hash: hash,
      trip_id: tripId,
      status: 200,
      response: JSON.stringify(outcome.answer),
      created_at: nowIso(),
    });
    return { replay: false as const, ...outcome };
  });
  if (!out.replay) {
    siteChanged(out.siteId);
    if (out.closedTripWave !== undefined && mailer) await afterTripClosed(db, mailer, out.closedTripWave);
  }
  return out.answer;
}

function assertOpenTrip(trip: DbTripRow): void {
  if (trip.status === 'done' || trip.status === 'cancelled') {
    throw new AppError('conflict', 'trip_closed', trip.status === 'done' ? 'This trip is already finished' : 'This trip was cancelled by the supervisor', {
      status: trip.status,
    });
  }
}

/**
 * When a pick happened: the tablet's time (queued offline work keeps the moment the picker acted),
 * bounded — not after the server's clock (a tablet running ahead, up to CLOCK_SKEW_MS, is pulled back;
 * further ahead is refused) and not before the trip started (or was assigned).
 */
export function pickTime(pickedAt: string | undefined, trip: Pick<DbTripRow, 'started_at' | 'assigned_at'>, now = Date.now()): string {
  if (!pickedAt) return new Date(now).toISOString();
  const t = Date.parse(pickedAt);
  if (!Number.isFinite(t)) return new Date(now).toISOString();
  if (t > now + CLOCK_SKEW_MS) {
    throw new AppError('validation', 'validation_failed', 'The tablet clock is ahead of the server; set its time and send again', [
      { field: 'pickedAt', message: `more than ${CLOCK_SKEW_MS / 1000} s in the future` },
    ]);
  }
  const floorAt = trip.started_at ?? trip.assigned_at;
  const lo = floorAt ? Date.parse(floorAt) : -Infinity;
  return new Date(Math.max(Math.min(t, now), Number.isFinite(lo) ? lo : -Infinity)).toISOString();
}

async function lineOfTrip(trx: Q, trip: DbTripRow, lineId: number): Promise<DbLineRow> {
  const line = await repo.getLineOfTrip(trx, trip.id, lineId);
  if (!line) throw notFound('Pick line');
  return line;
}

async function assertLineOpen(trx: Q, line: DbLineRow): Promise<void> {
  if (line.status === 'open') return;
  if (line.status === 'cancelled')
    throw new AppError('conflict', 'line_cancelled', 'This line was cancelled by the supervisor', {
      lineId: line.id,
      by: null,
      byId: null,
      at: null,
      status: line.status,
    });
  const byName = line.confirmed_by ? await repo.userNameOf(trx, line.confirmed_by) : undefined;
  const who = byName ?? 'someone';
  throw new AppError('conflict', 'already_confirmed', `Already ${line.status === 'short' ? 'reported short' : 'confirmed'} by ${who} at ${line.confirmed_at}`, {
    lineId: line.id,
    by: byName ?? null,
    byId: line.confirmed_by,
    at: line.confirmed_at,
    status: line.status,
  });
}

/**
 * A confirmation must be for the line the tablet showed: the printed stop number it sends must be the
 * line's, and a tap confirming another line within TAP_GUARD_MS of the last confirmation on this trip
 * (tablet clock) is a double tap. Both answer 409 line_not_shown and record nothing.
 */
async function assertShown(trx: Q, trip: DbTripRow, line: DbLineRow, body: ConfirmBody): Promise<void> {
  const stop = { n: await repo.stopNumber(trx, line.stop_id) };
  if (body.stopN !== undefined && body.stopN !== stop.n) {
    throw new AppError('conflict', 'line_not_shown', `This line is at stop ${stop.n}, not stop ${body.stopN} shown on the tablet; nothing was confirmed`, {
      lineId: line.id,
      stopN: stop.n,
      shownStopN: body.stopN,
    });
  }
  if (body.via !== 'tap' || !body.pickedAt) return;
  const t = Date.parse(body.pickedAt);
  const last = await repo.lastTabletPick(trx, trip.id, line.id);
  const prev = last ? Date.parse(last) : NaN;
  if (Number.isFinite(prev) && Number.isFinite(t) && t >= prev && t - prev < TAP_GUARD_MS) {
    throw new AppError('conflict', 'line_not_shown', 'A second tap came too soon after the last confirmation; nothing was confirmed', {
      lineId: line.id,
      stopN: stop.n,
      shownStopN: body.stopN ?? null,
    });
  }
}

/** After a line leaves 'open': its stop is done when none of its lines is open. Returns the stop's status. */
async function closeStopIfDone(trx: Q, tripId: number, stopId: number, at = nowIso()): Promise<'open' | 'done'> {
  if ((await repo.openLineCount(trx, tripId, stopId)) > 0) return 'open';
  await repo.markStopDone(trx, tripId, stopId, at);
  return 'done';
}

/** What the scanner must read for a line at this site. */
export function expectedScan(line: Pick<DbLineRow, 'bin' | 'sku'>, confirmScan: 'bin' | 'sku'): string {
  return confirmScan === 'bin' ? line.bin : line.sku;
}

/** Scanners differ in case and padding, never in the code itself. */
export const sameCode = (a: string, b: string): boolean => a.trim().toUpperCase() === b.trim().toUpperCase();

/** What a confirmation or short answers: the line as recorded, its stop, the trip's new revision. */
async function lineAnswer(trx: Q, trip: DbTripRow, line: DbLineRow, stopStatus: 'open' | 'done'): Promise<LineAnswer> {
  const revision = await bumpRevision(trx, trip.id);
  return { tripId: trip.id, tripStatus: trip.status, revision, line: lineView(line), stop: { id: line.stop_id, status: stopStatus } };
}

export async function confirmLine(db: Knex, actor: Actor, tripId: number, lineId: number, body: ConfirmBody, req: KeyedRequest): Promise<LineAnswer> {
  return idempotent(db, actor, tripId, req, body.pickedAt, async (trx, trip) => {
    assertOpenTrip(trip);
    const line = await lineOfTrip(trx, trip, lineId);
    await assertLineOpen(trx, line);
    await assertShown(trx, trip, line, body);
    if (body.via === 'scan') {
      const site = { confirm_scan: await repo.confirmScanOf(trx, trip.site_id) };
      const expected = expectedScan(line, site.confirm_scan);
      if (!body.scan || !sameCode(body.scan, expected)) {
        throw new AppError(
          'unprocessable',
          'wrong_scan',
          `Expected ${site.confirm_scan === 'bin' ? 'bin' : 'SKU'} ${expected}, scanned ${body.scan ?? '(nothing)'}`,
          {
            expected,
            scanned: body.scan,
            kind: site.confirm_scan,
          },
        );
      }
    }
    const at = pickTime(body.pickedAt, trip);
    await markStarted(trx, trip, at);
    return settleLine(
      trx,
      actor,
      trip,
      line,
      { status: 'picked', picked_qty: line.qty, confirmed_by: actor.id, confirmed_at: at, received_at: nowIso(), tablet_at: body.pickedAt ?? null },
      'pick.confirm',
      {
        qty: line.qty,
        via: body.via,
        scan: body.scan,
        pickedAt: body.pickedAt ?? null,
        key: req.key,
      },
    );
  });
}

/**
 * Records a line's outcome (picked or short) on an open line: the row, the stop closed when it was its
 * last open line, the audit entry, and the answer the tablet gets.
 */
async function settleLine(
  trx: Knex.Transaction,
  actor: Actor,
  trip: Parameters<typeof lineAnswer>[1],
  line: Parameters<typeof lineAnswer>[2],
  outcome: Record<string, unknown>,
  action: 'pick.confirm' | 'pick.short',
  detail: Record<string, unknown>,
) {
  await repo.settleOpenLine(trx, line.id, outcome);
  Object.assign(line, outcome);
  const stopStatus = await closeStopIfDone(trx, trip.id, line.stop_id, line.confirmed_at ?? nowIso());
  await audit(trx, {
    siteId: trip.site_id,
    userId: actor.id,
    action,
    subject: `line:${line.id}`,
    detail: { tripId: trip.id, stopId: line.stop_id, sku: line.sku, bin: line.bin, ...detail },
    device: actor.device,
  });
  return { answer: await lineAnswer(trx, trip, line, stopStatus), siteId: trip.site_id };
}

export async function shortLine(db: Knex, actor: Actor, tripId: number, lineId: number, body: ShortBody, req: KeyedRequest): Promise<LineAnswer> {
  return idempotent(db, actor, tripId, req, body.pickedAt, async (trx, trip) => {
    assertOpenTrip(trip);
    const line = await lineOfTrip(trx, trip, lineId);
    await assertLineOpen(trx, line);
    if (body.qtyFound >= line.qty) {
      throw invalid(`Found ${body.qtyFound} of ${line.qty}: that is not short; confirm the line instead`, [
        { field: 'qtyFound', message: `must be less than the ordered ${line.qty}` },
      ]);
    }
    const at = pickTime(body.pickedAt, trip);
    await markStarted(trx, trip, at);
    await repo.insertShort(trx, {
      site_id: trip.site_id,
      wave_id: trip.wave_id,
      trip_id: trip.id,
      line_id: line.id,
      qty_ordered: line.qty,
      qty_found: body.qtyFound,
      reason: body.reason,
      reported_by: actor.id,
      reported_at: at,
    });
    return settleLine(
      trx,
      actor,
      trip,
      line,
      {
        status: 'short',
        picked_qty: body.qtyFound,
        short_reason: body.reason,
        confirmed_by: actor.id,
        confirmed_at: at,
        received_at: nowIso(),
        tablet_at: body.pickedAt ?? null,
      },
      'pick.short',
      {
        ordered: line.qty,
        found: body.qtyFound,
        reason: body.reason,
        pickedAt: body.pickedAt ?? null,
        key: req.key,
      },
    );
  });
}

/**
 * "Skip for now": the stop goes to the end of the walk (after stops skipped earlier, in skip order)
 * and the other open stops are re-sequenced by the tour engine as an open walk from where the picker
 * is to the skipped tail. Printed stop numbers never change: the skipped stop keeps its number.
 */
export async function skipStop(db: Knex, actor: Actor, tripId: number, stopId: number, body: SkipBody, req: KeyedRequest): Promise<{ trip: PickTrip }> {
  return idempotent(db, actor, tripId, req, body.pickedAt, async (trx, trip) => {
    if (trip.picker_id !== actor.id) throw notYourTrip();
    assertOpenTrip(trip);
    const stops = await stopsOf(trx, trip.id);
    const stop = stops.find((s) => s.id === stopId);
    if (!stop) throw notFound('Stop');
    if (stop.status === 'done') throw new AppError('conflict', 'stop_done', 'This stop is already done');
    const at = nowIso();
    stop.skipped_at = at;
    const { done, open } = splitStops(stops);
    const wave = (await getWaveRow(trx, trip.wave_id))!;
    const plan = await loadPlanIndex(trx, wave.plan_id);
    const depot = depotNodeOf(plan, wave);
    const from = pickerNode(done, depot, walkedStopIds(await linesOf(trx, trip.id)));
    const before = open.map((s) => s.id);
    const { walk, cut } = orderRemaining(open, from, depot, distanceOf(plan), stop.id);
    const sequence = [...walk, ...cut];
    await repo.markStopSkipped(trx, stop.id, at);
    await writeWalkOrder(trx, done, sequence);
    await markStarted(trx, trip);
    await tripChanged(trx, actor, trip, {
      action: 'pick.skip',
      subject: `stop:${stop.id}`,
      detail: { tripId: trip.id, stopN: stop.n, bins: stop.bins, openBefore: before, openAfter: sequence.map((s) => s.id), key: req.key },
    });
    return { answer: { trip: (await loadPickTrip(trx, trip.id))! }, siteId: trip.site_id };
  });
}

/**
 * Puts a recorded line back to open (its stop reopens, a short record goes): the picker's undo and
 * the supervisor's correction. The caller checks who may and audits.
 */
async function reopenLine(trx: Q, line: DbLineRow): Promise<void> {
  // A short already re-picked (an order made for it) or on the replenishment list stays as recorded.
  const short = await repo.shortOfLine(trx, line.id);
  if (short && (short.follow_up === 'repick' || short.follow_up === 'replenish'))
    throw new AppError(
      'conflict',
      'short_followed_up',
      short.follow_up === 'repick'
        ? 'This short was already sent to re-pick in a later wave (an order was made for it): the line can no longer be reopened'
        : 'This short is on the replenishment list: the line can no longer be reopened',
      { shortId: short.id, followUp: short.follow_up, repickOrderId: short.repick_order_id },
    );
  await repo.reopenLineRow(trx, line);
  Object.assign(line, { status: 'open', picked_qty: null, short_reason: null, confirmed_by: null, confirmed_at: null, received_at: null, tablet_at: null });
}

/**
 * The picker's undo of a line they just confirmed or reported short: within UNDO_WINDOW_MS of the
 * server receiving it, on an open trip. The line is open again, with an audit entry.
 */
export async function undoLine(db: Knex, actor: Actor, tripId: number, lineId: number, req: KeyedRequest, now = Date.now()): Promise<LineAnswer> {
  return idempotent(db, actor, tripId, req, undefined, async (trx, trip) => {
    if (trip.picker_id !== actor.id) throw notYourTrip();
    assertOpenTrip(trip);
    const line = await lineOfTrip(trx, trip, lineId);
    if ((line.status !== 'picked' && line.status !== 'short') || line.confirmed_by !== actor.id) {
      throw new AppError('conflict', 'undo_not_possible', 'Only a line you just confirmed or reported short can be undone', { lineId, status: line.status });
    }
    const received = line.received_at ? Date.parse(line.received_at) : NaN;
    if (!(now - received <= UNDO_WINDOW_MS)) {
      throw new AppError(
        'conflict',
        'undo_expired',
        `Undo is possible for ${UNDO_WINDOW_MS / 1000} s after a confirmation; ask your supervisor to correct the line`,
        { lineId },
      );
    }
    const was = { status: line.status, pickedQty: line.picked_qty, reason: line.short_reason, at: line.confirmed_at };
    await reopenLine(trx, line);
    await audit(trx, {
      siteId: trip.site_id,
      userId: actor.id,
      action: 'pick.undo',
      subject: `line:${line.id}`,
      detail: { tripId: trip.id, stopId: line.stop_id, sku: line.sku, bin: line.bin, was, key: req.key },
      device: actor.device,
    });
    return { answer: await lineAnswer(trx, trip, line, 'open'), siteId: trip.site_id };
  });
}

/**
 * The supervisor's correction of a recorded line on a trip still open (picked by mistake, a double
 * tap found later): the line goes back to open for the picker, with the reason in the audit trail.
 */
export async function correctLine(db: Knex, actor: Actor, siteId: number, lineId: number, reason: string): Promise<LineAnswer> {
  const answer = await db.transaction(async (trx) => {
    const line = await repo.getLineRow(trx, lineId);
    const trip = line ? await getTripRow(trx, line.trip_id) : undefined;
    if (!line || !trip || trip.site_id !== siteId) throw notFound('Pick line');
    if (trip.status === 'done' || trip.status === 'cancelled') {
      throw new AppError('conflict', 'trip_closed', `Trip ${trip.n} is ${trip.status}: its lines can no longer be reopened`, { status: trip.status });
    }
    if (line.status !== 'picked' && line.status !== 'short')
      throw new AppError('conflict', 'line_not_recorded', `This line is ${line.status}: there is nothing to correct`, { status: line.status });
    const was = { status: line.status, pickedQty: line.picked_qty, reason: line.short_reason, by: line.confirmed_by, at: line.confirmed_at };
    await reopenLine(trx, line);
    await audit(trx, {
      siteId,
      userId: actor.id,
      action: 'pick.correct',
      subject: `line:${line.id}`,
      detail: { tripId: trip.id, stopId: line.stop_id, sku: line.sku, bin: line.bin, was, reason },
      device: actor.device,
    });
    return lineAnswer(trx, trip, line, 'open');
  });
  siteChanged(siteId);
  return answer;
}

export async function tripResult(db: Q, tripId: number): Promise<TripResult> {
  const trip = (await getTripRow(db, tripId))!;
  const wave = (await getWaveRow(db, trip.wave_id))!;
  const lines = await linesOf(db, tripId);
  const stops = await stopsOf(db, tripId);
  const end = trip.finished_at ? Date.parse(trip.finished_at) : Date.now();
  return {
    tripId: trip.id,
    n: trip.n,
    waveName: wave.name,
    status: trip.status,
    lines: lines.length,
    picked: lines.filter((l) => l.status === 'picked').length,
    shorts: lines.filter((l) => l.status === 'short').length,
    cancelled: lines.filter((l) => l.status === 'cancelled').length,
    stops: stops.length,
    plannedMetres: finiteOrNull(trip.planned_metres) ?? 0,
    walkedMetres: finiteOrNull(trip.walked_metres) ?? (trip.status === 'done' || trip.status === 'cancelled' ? null : await walkedMetres(db, trip)),
    estMinutes: finiteOrNull(trip.est_seconds / 60) ?? 0,
    minutes: trip.started_at ? finiteOrNull((end - Date.parse(trip.started_at)) / 60_000) : null,
    startedAt: trip.started_at,
    finishedAt: trip.finished_at,
  };
}

/** Owner-only read of a trip's figures (summary screen after Return to depot). */
export async function getTripResult(db: Q, actor: Actor, tripId: number): Promise<TripResult> {
  const trip = await getTripRow(db, tripId);
  if (!trip || (actor.role !== 'admin' && !actor.siteIds.includes(trip.site_id))) throw notFound('Trip');
  // The summary stays readable by the picker who finished the trip.
  if (trip.picker_id !== actor.id) throw notYourTrip();
  return tripResult(db, tripId);
}

/** "Return to depot": every line must be picked, short or cancelled; the trip is done. */
export async function finishTrip(db: Knex, mailer: Mailer, actor: Actor, tripId: number, req: KeyedRequest): Promise<TripResult> {
  return idempotent(
    db,
    actor,
    tripId,
    req,
    undefined,
    async (trx, trip) => {
      if (trip.picker_id !== actor.id) throw notYourTrip();
      assertOpenTrip(trip);
      const n = await repo.openLineCount(trx, trip.id);
      if (n > 0) throw new AppError('conflict', 'lines_open', `${n} line${n === 1 ? '' : 's'} still to pick or report short`, { open: n });
      await markStarted(trx, trip);
      // Null when not measurable (a closure cut off a stop already picked): the trip still finishes.
      const walked = await walkedMetres(trx, trip);
      const at = nowIso();
      await repo.markTripDone(trx, trip.id, walked, at);
      await tripChanged(trx, actor, trip, { action: 'trip.finish', subject: `trip:${trip.id}`, detail: { walkedMetres: walked } });
      return { answer: await tripResult(trx, trip.id), siteId: trip.site_id, closedTripWave: trip.wave_id };
    },
    mailer,
  );
}
