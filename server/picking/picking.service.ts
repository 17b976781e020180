/**
 * The picker's side: take a trip, confirm, short, skip, return to the depot. Every write runs in one
 * transaction with its idempotency record and audit entry, so the answer is sent only after SQLite
 * has committed it (synchronous=FULL on every connection, server/db/knex.ts).
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { Role } from '../../shared/common';
import type { ConfirmBody, LineAnswer, PickTrip, ShortBody, SkipBody, TripPulse, TripResult } from '../../shared/picking';
import { audit } from '../audit/audit';
import type { Mailer } from '../mail/mailer';
import { AppError, invalid, notFound } from '../http/errors';
import { loadPlanIndex } from '../floor-plans/plan-index';
import { siteChanged } from './events';
import {
  ACTIVE_TRIP,
  bumpRevision,
  depotNodeOf,
  distanceOf,
  getTripRow,
  getWaveRow,
  lineView,
  linesOf,
  loadPickTrip,
  splitStops,
  stopsOf,
  type DbLineRow,
  type DbTripRow,
  type Q,
} from './picking.repository';
import { groupCommit } from './group-commit';
import { lockForTransaction } from '../db/dialect';
import { resequenceFree } from './route-math';
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
  const former = await db('trip_assignments').where({ trip_id: tripId, picker_id: actor.id }).whereNotNull('ended_at').orderBy('ended_at', 'desc').first<{ ended_at: string }>('ended_at');
  if (!former) throw notYourTrip();
  return { trip, formerUntil: former.ended_at };
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

async function activeTripOf(db: Q, pickerId: number, siteId: number): Promise<DbTripRow | undefined> {
  return db<DbTripRow>('trips').where({ picker_id: pickerId, site_id: siteId }).whereIn('status', ACTIVE_TRIP).orderBy('assigned_at').first();
}

async function releasedCount(db: Q, siteId: number): Promise<number> {
  const r = await db('trips').join('waves', 'waves.id', 'trips.wave_id').where({ 'trips.site_id': siteId, 'trips.status': 'released' }).whereIn('waves.status', ['released', 'picking']).whereNull('trips.picker_id').count<{ n: number }[]>({ n: '*' });
  return Number(r[0]!.n);
}

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
      const next = await trx('trips')
        .join('waves', 'waves.id', 'trips.wave_id')
        .where({ 'trips.site_id': siteId, 'trips.status': 'released' })
        .whereNull('trips.picker_id')
        .whereIn('waves.status', ['released', 'picking'])
        .orderByRaw('trips.due IS NULL, trips.due ASC, waves.created_at ASC, waves.id ASC, trips.n ASC')
        .first<{ id: number } | undefined>('trips.id');
      if (!next) return null;
      const at = nowIso();
      const claimed = await trx('trips').where({ id: next.id, status: 'released' }).whereNull('picker_id').update({ status: 'assigned', picker_id: actor.id, assigned_at: at });
      if (claimed !== 1) continue;
      await trx('trip_assignments').insert({ trip_id: next.id, picker_id: actor.id, assigned_by: actor.id, assigned_at: at });
      await bumpRevision(trx, next.id);
      await audit(trx, { siteId, userId: actor.id, action: 'trip.take', subject: `trip:${next.id}`, detail: { tripId: next.id }, device: actor.device });
      return next.id;
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
    await bumpRevision(trx, trip.id);
    await audit(trx, { siteId: trip.site_id, userId: actor.id, action: 'trip.start', subject: `trip:${trip.id}`, device: actor.device });
    return true;
  });
  const trip = (await loadPickTrip(db, tripId))!;
  if (started) siteChanged(trip.siteId);
  return trip;
}

async function markStarted(trx: Q, trip: DbTripRow): Promise<void> {
  if (trip.status === 'picking' && trip.started_at) return;
  const at = trip.started_at ?? nowIso();
  await trx('trips').where({ id: trip.id }).update({ status: 'picking', started_at: at });
  await trx('waves').where({ id: trip.wave_id, status: 'released' }).update({ status: 'picking' });
  const orderIds = trx('trip_orders').where({ trip_id: trip.id }).select('order_id');
  await trx('orders').whereIn('id', orderIds).where({ status: 'planned' }).update({ status: 'picking' });
  trip.status = 'picking';
  trip.started_at = at;
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
    return `{${Object.keys(o).filter((k) => o[k] !== undefined).sort().map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`).join(',')}}`;
  }
  return JSON.stringify(v ?? null);
}

export const requestHash = (r: KeyedRequest): string => createHash('sha256').update(`${r.method.toUpperCase()} ${r.path}\n${canonical(r.body)}`).digest('hex');

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
    throw new AppError('validation', 'idempotency_key_required', 'Send an Idempotency-Key header with every picking request', [{ field: 'Idempotency-Key', message: 'required' }]);
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
    // Keys are per user: a stored answer goes back only to the picker who made it.
    const stored = await trx('pick_requests').where({ user_id: actor.id, idem_key: key }).first<{ request_hash: string; response: string } | undefined>('request_hash', 'response');
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
      if (!(done <= Date.parse(formerUntil) + CLOCK_SKEW_MS)) {
        throw new AppError('forbidden', 'trip_reassigned', 'This trip was given to another picker', { until: formerUntil });
      }
    }
    const outcome = await run(trx, trip);
    await trx('pick_requests').insert({ user_id: actor.id, idem_key: key, request_hash: hash, trip_id: tripId, status: 200, response: JSON.stringify(outcome.answer), created_at: nowIso() });
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
    throw new AppError('conflict', 'trip_closed', trip.status === 'done' ? 'This trip is already finished' : 'This trip was cancelled by the supervisor', { status: trip.status });
  }
}

async function lineOfTrip(trx: Q, trip: DbTripRow, lineId: number): Promise<DbLineRow> {
  const line = await trx<DbLineRow>('pick_lines').where({ id: lineId, trip_id: trip.id }).first();
  if (!line) throw notFound('Pick line');
  return line;
}

async function assertLineOpen(trx: Q, line: DbLineRow): Promise<void> {
  if (line.status === 'open') return;
  if (line.status === 'cancelled') throw new AppError('conflict', 'line_cancelled', 'This line was cancelled by the supervisor', { lineId: line.id, by: null, byId: null, at: null, status: line.status });
  const by = line.confirmed_by ? await trx('users').where({ id: line.confirmed_by }).first<{ name: string }>('name') : undefined;
  const who = by?.name ?? 'someone';
  throw new AppError('conflict', 'already_confirmed', `Already ${line.status === 'short' ? 'reported short' : 'confirmed'} by ${who} at ${line.confirmed_at}`, {
    lineId: line.id,
    by: by?.name ?? null,
    byId: line.confirmed_by,
    at: line.confirmed_at,
    status: line.status,
  });
}

/** After a line leaves 'open': its stop is done when none of its lines is open. Returns the stop's status. */
async function closeStopIfDone(trx: Q, tripId: number, stopId: number): Promise<'open' | 'done'> {
  // trip_id first: the (trip_id, stop_id) index serves this; stop_id alone would scan every line.
  const open = await trx('pick_lines').where({ trip_id: tripId, stop_id: stopId, status: 'open' }).count<{ n: number }[]>({ n: '*' });
  if (Number(open[0]!.n) > 0) return 'open';
  const seq = await trx('stops').where({ trip_id: tripId }).max<{ m: number | null }[]>({ m: 'done_seq' });
  await trx('stops').where({ id: stopId, status: 'open' }).update({ status: 'done', done_at: nowIso(), done_seq: (seq[0]!.m ?? 0) + 1 });
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
    if (body.via === 'scan') {
      const site = (await trx('sites').where({ id: trip.site_id }).first<{ confirm_scan: 'bin' | 'sku' }>('confirm_scan'))!;
      const expected = expectedScan(line, site.confirm_scan);
      if (!body.scan || !sameCode(body.scan, expected)) {
        throw new AppError('unprocessable', 'wrong_scan', `Expected ${site.confirm_scan === 'bin' ? 'bin' : 'SKU'} ${expected}, scanned ${body.scan ?? '(nothing)'}`, {
          expected,
          scanned: body.scan,
          kind: site.confirm_scan,
        });
      }
    }
    await markStarted(trx, trip);
    const at = nowIso();
    return settleLine(trx, actor, trip, line, { status: 'picked', picked_qty: line.qty, confirmed_by: actor.id, confirmed_at: at }, 'pick.confirm', {
      qty: line.qty, via: body.via, scan: body.scan, pickedAt: body.pickedAt ?? null, key: req.key,
    });
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
  await trx('pick_lines').where({ id: line.id, status: 'open' }).update(outcome);
  Object.assign(line, outcome);
  const stopStatus = await closeStopIfDone(trx, trip.id, line.stop_id);
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
      throw invalid(`Found ${body.qtyFound} of ${line.qty}: that is not short; confirm the line instead`, [{ field: 'qtyFound', message: `must be less than the ordered ${line.qty}` }]);
    }
    await markStarted(trx, trip);
    const at = nowIso();
    await trx('pick_shorts').insert({ site_id: trip.site_id, wave_id: trip.wave_id, trip_id: trip.id, line_id: line.id, qty_ordered: line.qty, qty_found: body.qtyFound, reason: body.reason, reported_by: actor.id, reported_at: at });
    return settleLine(trx, actor, trip, line, { status: 'short', picked_qty: body.qtyFound, short_reason: body.reason, confirmed_by: actor.id, confirmed_at: at }, 'pick.short', {
      ordered: line.qty, found: body.qtyFound, reason: body.reason, pickedAt: body.pickedAt ?? null, key: req.key,
    });
  });
}

/**
 * "Skip for now": the stop goes to the end (after stops skipped earlier, in skip order) and the
 * other open stops are re-sequenced by the tour engine as an open walk from the last finished stop
 * (or the depot) to the skipped tail. Stop numbers after the finished ones are renumbered.
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
    const tail = open.filter((s) => s.skipped_at !== null).sort((a, b) => a.skipped_at!.localeCompare(b.skipped_at!) || (a.id === stop.id ? 1 : b.id === stop.id ? -1 : a.n - b.n));
    const free = open.filter((s) => s.skipped_at === null);
    const wave = (await getWaveRow(trx, trip.wave_id))!;
    const plan = await loadPlanIndex(trx, wave.plan_id);
    const from = done.length ? done[done.length - 1]!.node : depotNodeOf(plan, wave);
    const before = open.map((s) => s.id);
    const order = resequenceFree(free.map((s) => s.node), from, tail[0]!.node, distanceOf(plan));
    const sequence = [...order.map((i) => free[i]!), ...tail];
    let n = done.length;
    for (const s of sequence) {
      n += 1;
      await trx('stops').where({ id: s.id }).update({ n, ...(s.id === stop.id ? { skipped_at: at } : {}) });
    }
    for (const [i, s] of done.entries()) await trx('stops').where({ id: s.id }).update({ n: i + 1 });
    await markStarted(trx, trip);
    await bumpRevision(trx, trip.id);
    await audit(trx, {
      siteId: trip.site_id,
      userId: actor.id,
      action: 'pick.skip',
      subject: `stop:${stop.id}`,
      detail: { tripId: trip.id, bins: stop.bins, openBefore: before, openAfter: sequence.map((s) => s.id), key: req.key },
      device: actor.device,
    });
    return { answer: { trip: (await loadPickTrip(trx, trip.id))! }, siteId: trip.site_id };
  });
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
    plannedMetres: trip.planned_metres,
    walkedMetres: trip.walked_metres ?? (await walkedMetres(db, trip)),
    estMinutes: trip.est_seconds / 60,
    minutes: trip.started_at ? (end - Date.parse(trip.started_at)) / 60_000 : null,
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
  return idempotent(db, actor, tripId, req, undefined, async (trx, trip) => {
    if (trip.picker_id !== actor.id) throw notYourTrip();
    assertOpenTrip(trip);
    const open = await trx('pick_lines').where({ trip_id: trip.id, status: 'open' }).count<{ n: number }[]>({ n: '*' });
    const n = Number(open[0]!.n);
    if (n > 0) throw new AppError('conflict', 'lines_open', `${n} line${n === 1 ? '' : 's'} still to pick or report short`, { open: n });
    await markStarted(trx, trip);
    const walked = await walkedMetres(trx, trip);
    const at = nowIso();
    await trx('trips').where({ id: trip.id }).update({ status: 'done', finished_at: at, walked_metres: walked });
    await bumpRevision(trx, trip.id);
    const orderIds = trx('trip_orders').where({ trip_id: trip.id }).select('order_id');
    await trx('orders').whereIn('id', orderIds).whereIn('status', ['planned', 'picking']).update({ status: 'done' });
    await audit(trx, { siteId: trip.site_id, userId: actor.id, action: 'trip.finish', subject: `trip:${trip.id}`, detail: { walkedMetres: walked }, device: actor.device });
    return { answer: await tripResult(trx, trip.id), siteId: trip.site_id, closedTripWave: trip.wave_id };
  }, mailer);
}
