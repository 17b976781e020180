/** Rows of the waves tables as picking reads them, and the trip as the tablet sees it. */
import type { Q } from '../db/knex';
import type { BoardShort, HandledShort, PickStop, PickTrip, ReplenishmentItem, ShortFollowUp, ShortReason } from '../../shared/picking';
import { circuitPolyline, pairDistance } from '../core/plan/distances';
import { loadPlanIndex, type LoadedPlan } from '../floor-plans/plan-index';

export interface DbTripRow {
  id: number;
  wave_id: number;
  site_id: number;
  n: number;
  status: 'released' | 'assigned' | 'picking' | 'done' | 'cancelled';
  picker_id: number | null;
  planned_metres: number;
  lower_bound_metres: number;
  s_shape_metres: number | null;
  est_seconds: number;
  totes: number;
  kg: number;
  litres: number;
  depot_node: number;
  due: string | null;
  assigned_at: string | null;
  started_at: string | null;
  finished_at: string | null;
  cancelled_at: string | null;
  walked_metres: number | null;
  revision: number;
  /** Set when a closure change re-routed the trip's remaining stops (the tablet tells the picker). */
  route_changed_at: string | null;
  /** When the picker confirmed which order goes in which tote (cart set-up). */
  cart_ready_at: string | null;
}

export interface DbWaveRow {
  id: number;
  site_id: number;
  plan_id: number;
  name: string;
  status: 'released' | 'picking' | 'completed' | 'cancelled';
  depot_idx: number;
  created_at: string;
  completed_at: string | null;
  report_mailed_at: string | null;
}

export interface DbStopRow {
  id: number;
  trip_id: number;
  n: number;
  node: number;
  x_m: number;
  y_m: number;
  bins: string;
  status: 'open' | 'done';
  done_at: string | null;
  done_seq: number | null;
  skipped_at: string | null;
  /** Walking order of the stop; null on rows written before it existed (then `n`). `n` is the printed number, fixed at release. */
  walk_seq: number | null;
}

export interface DbLineRow {
  id: number;
  trip_id: number;
  stop_id: number;
  order_id: number;
  order_line_id: number;
  order_ref: string;
  sku: string;
  description: string;
  bin: string;
  qty: number;
  tote: number;
  status: 'open' | 'picked' | 'short' | 'cancelled';
  picked_qty: number | null;
  short_reason: string | null;
  confirmed_by: number | null;
  /** When the picker confirmed, by the tablet's clock (bounded by the trip's start and the server's clock). */
  confirmed_at: string | null;
  /** When the server received the confirmation or short. */
  received_at: string | null;
  /** The tablet's time as sent, unbounded (the double-tap guard). */
  tablet_at: string | null;
}

export const ACTIVE_TRIP = ['assigned', 'picking'] as const;
/** Trips not yet finished or cancelled. */
export const OPEN_TRIP = ['released', ...ACTIVE_TRIP] as const;

export const getTripRow = (db: Q, id: number): Promise<DbTripRow | undefined> => db<DbTripRow>('trips').where({ id }).first();
export const getWaveRow = (db: Q, id: number): Promise<DbWaveRow | undefined> => db<DbWaveRow>('waves').where({ id }).first();
/** A trip's stops in walking order (the printed number `n` never changes; the walking order may). */
export const stopsOf = (db: Q, tripId: number): Promise<DbStopRow[]> =>
  db<DbStopRow>('stops').where({ trip_id: tripId }).orderByRaw('COALESCE(walk_seq, n), n, id');

/** Where a stop sits in the walk. */
export const walkOrder = (s: Pick<DbStopRow, 'walk_seq' | 'n'>): number => s.walk_seq ?? s.n;
export const linesOf = (db: Q, tripId: number): Promise<DbLineRow[]> => db<DbLineRow>('pick_lines').where({ trip_id: tripId }).orderBy('id');

/** Stop bins are stored as a JSON array, or a comma list in older rows. */
export function binsOf(raw: string): string[] {
  try {
    const v: unknown = JSON.parse(raw);
    if (Array.isArray(v)) return v.map(String);
  } catch {
    // plain text below
  }
  return raw
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
}

/** Open stops in walking order, done stops in the order they were finished. */
export function splitStops(stops: DbStopRow[]): { done: DbStopRow[]; open: DbStopRow[] } {
  const done = stops.filter((s) => s.status === 'done').sort((a, b) => (a.done_seq ?? a.n) - (b.done_seq ?? b.n) || a.id - b.id);
  const open = stops.filter((s) => s.status !== 'done').sort((a, b) => walkOrder(a) - walkOrder(b) || a.n - b.n || a.id - b.id);
  return { done, open };
}

/** The wave's depot on its plan (trips store the wave's depot index, not always a node). */
export const depotNodeOf = (plan: LoadedPlan, wave: Pick<DbWaveRow, 'depot_idx'>): number => plan.depotNodes[wave.depot_idx] ?? plan.depotNodes[0]!;

export const distanceOf = (plan: LoadedPlan) => (a: number, b: number) => pairDistance(plan.index, a, b);

/** A finite number, else null: metres, minutes and ratios are never stored or shown as Infinity or NaN. */
export const finiteOrNull = (v: number | null | undefined): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/**
 * Where the picker is, as far as the server knows: the last finished stop they actually walked to
 * (a stop settled only as "cannot reach" was not walked to), else the depot.
 */
export function pickerNode(done: readonly DbStopRow[], depot: number, walked: ReadonlySet<number> | null = null): number {
  for (let i = done.length - 1; i >= 0; i--) if (!walked || walked.has(done[i]!.id)) return done[i]!.node;
  return depot;
}

/** Ids of a trip's stops with at least one line picked or short for another reason than "cannot reach". */
export function walkedStopIds(lines: readonly Pick<DbLineRow, 'stop_id' | 'status' | 'short_reason'>[]): Set<number> {
  const out = new Set<number>();
  for (const l of lines) if (l.status === 'picked' || (l.status === 'short' && l.short_reason !== 'cannot_reach')) out.add(l.stop_id);
  return out;
}

/** The trip as the picker's tablet shows it (one row read per table, the plan index from cache). */
export async function loadPickTrip(db: Q, tripId: number): Promise<PickTrip | null> {
  const trip = await getTripRow(db, tripId);
  if (!trip) return null;
  const wave = (await getWaveRow(db, trip.wave_id))!;
  const site = (await db('sites').where({ id: trip.site_id }).first<{ name: string; confirm_scan: 'bin' | 'sku' }>('name', 'confirm_scan'))!;
  const picker = trip.picker_id ? await db('users').where({ id: trip.picker_id }).first<{ name: string }>('name') : undefined;
  const orders: { ref: string }[] = await db('trip_orders')
    .join('orders', 'orders.id', 'trip_orders.order_id')
    .where('trip_orders.trip_id', tripId)
    .orderBy('orders.ref')
    .select('orders.ref');
  const [stops, lines] = await Promise.all([stopsOf(db, tripId), linesOf(db, tripId)]);
  const plan = await loadPlanIndex(db, wave.plan_id);
  const depotNode = depotNodeOf(plan, wave);

  const byStop = new Map<number, DbLineRow[]>();
  for (const l of lines) {
    const list = byStop.get(l.stop_id) ?? [];
    list.push(l);
    byStop.set(l.stop_id, list);
  }
  const dist = distanceOf(plan);
  const { done } = splitStops(stops);
  const from = pickerNode(done, depotNode, walkedStopIds(lines));
  const reachable = (node: number) => Number.isFinite(dist(from, node)) && Number.isFinite(dist(node, depotNode));
  const stopList: PickStop[] = stops.map((s) => ({
    id: s.id,
    n: s.n,
    x: s.x_m,
    y: s.y_m,
    bins: binsOf(s.bins),
    status: s.status === 'done' ? 'done' : 'open',
    skipped: s.skipped_at !== null && s.status !== 'done',
    cutOff: s.status !== 'done' && !reachable(s.node),
    lines: (byStop.get(s.id) ?? []).map(lineView),
  }));
  const openStop = (s: PickStop) => s.status === 'open' && s.lines.some((l) => l.status === 'open');
  const current = stopList.find((s) => openStop(s) && !s.cutOff) ?? stopList.find(openStop) ?? null;
  // The drawn route leaves out stops no walk reaches now (a closure); they are listed as cut off.
  const walkable = stops.filter((s, i) => !stopList[i]!.cutOff && Number.isFinite(dist(depotNode, s.node)));
  const poly = circuitPolyline(plan.graph, [depotNode, ...walkable.map((s) => s.node)], true, plan.index);
  const path: [number, number][] = [];
  if (poly) for (let i = 0; i + 1 < poly.length; i += 2) path.push([poly[i]!, poly[i + 1]!]);
  const depot = plan.geometry.depots[wave.depot_idx];
  return {
    id: trip.id,
    n: trip.n,
    status: trip.status,
    pickerId: trip.picker_id,
    pickerName: picker?.name ?? null,
    orders: orders.map((o) => o.ref),
    stops: stops.length,
    lines: lines.length,
    plannedMetres: trip.planned_metres,
    lowerBoundMetres: trip.lower_bound_metres,
    estMinutes: trip.est_seconds / 60,
    routeChangedAt: trip.route_changed_at,
    totes: trip.totes,
    kg: trip.kg,
    litres: trip.litres,
    waveId: wave.id,
    waveName: wave.name,
    planId: wave.plan_id,
    siteName: site.name,
    siteId: trip.site_id,
    stopList,
    path,
    depot: [plan.graph.x[depotNode]!, plan.graph.y[depotNode]!],
    depotCode: depot?.code ?? 'Depot',
    confirmScan: site.confirm_scan,
    startedAt: trip.started_at,
    finishedAt: trip.finished_at,
    cartReadyAt: trip.cart_ready_at ?? null,
    currentStopId: current?.id ?? null,
    revision: trip.revision,
  };
}

/** Raises a trip's revision: every write calls it, so the tablet's poll sees the change. */
export async function bumpRevision(db: Q, tripId: number): Promise<number> {
  // One statement (RETURNING: SQLite ≥ 3.35 and PostgreSQL): this runs inside every confirmation.
  const rows = (await db('trips')
    .where({ id: tripId })
    .update({ revision: db.raw('revision + 1') }, ['revision'])) as { revision: number }[];
  return rows[0]!.revision;
}

/** A pick line as the tablet, the board and the print view show it. */
export function lineView(l: Pick<DbLineRow, 'id' | 'order_ref' | 'sku' | 'description' | 'bin' | 'qty' | 'tote' | 'status' | 'picked_qty' | 'short_reason'>) {
  return {
    id: l.id,
    orderRef: l.order_ref,
    sku: l.sku,
    description: l.description,
    bin: l.bin,
    qty: l.qty,
    tote: l.tote,
    status: l.status,
    pickedQty: l.picked_qty,
    shortReason: l.short_reason,
  };
}

/* ---- The live board and the supervisor's actions on it ---- */

/** Waves on the site's board: released or picking, and those finished since `since`. */
export async function boardWaveRows(db: Q, siteId: number, since: string): Promise<DbWaveRow[]> {
  return db<DbWaveRow>('waves')
    .where({ site_id: siteId })
    .andWhere((q) =>
      q.whereIn('status', ['released', 'picking']).orWhere((q2) => q2.whereIn('status', ['completed', 'cancelled']).andWhere('completed_at', '>=', since)),
    )
    .orderBy('created_at');
}

export type BoardLineRow = Pick<DbLineRow, 'id' | 'trip_id' | 'stop_id' | 'status' | 'short_reason' | 'order_ref' | 'sku' | 'bin' | 'qty'>;

/** The trips of these waves with their picker's name, by wave then trip number. */
export async function tripsWithPicker(db: Q, waveIds: number[]): Promise<(DbTripRow & { picker_name: string | null })[]> {
  return db('trips')
    .leftJoin('users', 'users.id', 'trips.picker_id')
    .whereIn('trips.wave_id', waveIds)
    .orderBy(['trips.wave_id', 'trips.n'])
    .select('trips.*', 'users.name as picker_name');
}

/** The trips of these waves (with the picker's name), their stops and their lines. */
export async function boardTripRows(
  db: Q,
  waveIds: number[],
): Promise<{ trips: (DbTripRow & { picker_name: string | null })[]; stops: DbStopRow[]; lines: BoardLineRow[] }> {
  const trips = waveIds.length ? await tripsWithPicker(db, waveIds) : [];
  const tripIds = trips.map((t) => t.id);
  const stops: DbStopRow[] = tripIds.length ? await db<DbStopRow>('stops').whereIn('trip_id', tripIds) : [];
  const lines: BoardLineRow[] = tripIds.length
    ? await db('pick_lines').whereIn('trip_id', tripIds).select('id', 'trip_id', 'stop_id', 'status', 'short_reason', 'order_ref', 'sku', 'bin', 'qty')
    : [];
  return { trips, stops, lines };
}

/** The shorts table joined to its line, trip, wave and reporter. */
const shortsJoined = (db: Q) =>
  db('pick_shorts')
    .join('pick_lines', 'pick_lines.id', 'pick_shorts.line_id')
    .join('trips', 'trips.id', 'pick_shorts.trip_id')
    .join('waves', 'waves.id', 'pick_shorts.wave_id')
    .leftJoin('users as reporter', 'reporter.id', 'pick_shorts.reported_by');

/** A site's shorts, for the board and the replenishment list. */
const shortsQuery = (db: Q, siteId: number) => shortsJoined(db).where('pick_shorts.site_id', siteId);

/** A wave's shorts as its report lists them, oldest first. */
export async function waveShortRows(db: Q, waveId: number): Promise<DbWaveShortRow[]> {
  return shortsJoined(db)
    .where('pick_shorts.wave_id', waveId)
    .orderBy('pick_shorts.reported_at')
    .select(
      'pick_lines.order_ref',
      'pick_lines.sku',
      'pick_lines.bin',
      'pick_shorts.qty_ordered',
      'pick_shorts.qty_found',
      'pick_shorts.reason',
      'pick_shorts.reported_at',
      'reporter.name',
      'trips.n',
    );
}

export interface DbWaveShortRow {
  order_ref: string;
  sku: string;
  bin: string;
  qty_ordered: number;
  qty_found: number;
  reason: ShortReason;
  reported_at: string;
  name: string | null;
  n: number;
}

/** What a short is, wherever it is listed: the line, how much was found, why, who found it when, and where. */
const SHORT_COLUMNS = {
  id: 'pick_shorts.id',
  waveId: 'waves.id',
  waveName: 'waves.name',
  tripId: 'trips.id',
  tripN: 'trips.n',
  orderRef: 'pick_lines.order_ref',
  sku: 'pick_lines.sku',
  description: 'pick_lines.description',
  bin: 'pick_lines.bin',
  qtyOrdered: 'pick_shorts.qty_ordered',
  qtyFound: 'pick_shorts.qty_found',
  reason: 'pick_shorts.reason',
  reportedBy: 'reporter.name',
  reportedAt: 'pick_shorts.reported_at',
} as const;

/** Shorts of the site nobody has handled yet, oldest first. */
export async function unhandledShorts(db: Q, siteId: number): Promise<BoardShort[]> {
  return shortsQuery(db, siteId).whereNull('pick_shorts.handled_at').orderBy('pick_shorts.reported_at').select(SHORT_COLUMNS);
}

/** Shorts handled since `since` (ISO time), newest first, with the follow-up chosen and the re-pick order. */
export async function handledShortsSince(db: Q, siteId: number, since: string): Promise<HandledShort[]> {
  const rows: (Omit<HandledShort, 'repickOrder' | 'followUp'> & { followUp: string | null; repickId: number | null; repickRef: string | null })[] =
    await shortsQuery(db, siteId)
      .leftJoin('users as handler', 'handler.id', 'pick_shorts.handled_by')
      .leftJoin('orders as repick', 'repick.id', 'pick_shorts.repick_order_id')
      .where('pick_shorts.handled_at', '>=', since)
      .orderBy('pick_shorts.handled_at', 'desc')
      .orderBy('pick_shorts.id', 'desc')
      .limit(200)
      .select({
        ...SHORT_COLUMNS,
        followUp: 'pick_shorts.follow_up',
        handledBy: 'handler.name',
        handledAt: 'pick_shorts.handled_at',
        repickId: 'repick.id',
        repickRef: 'repick.ref',
      });
  return rows.map(({ repickId, repickRef, followUp, ...r }) => ({
    ...r,
    followUp: (followUp ?? 'handled') as ShortFollowUp,
    repickOrder: repickId !== null && repickRef !== null ? { id: repickId, ref: repickRef } : null,
  }));
}

/** The replenishment list: shorts sent to it, newest first; restocked ones only when asked. */
export async function replenishmentRows(db: Q, siteId: number, includeRestocked: boolean): Promise<ReplenishmentItem[]> {
  const q = shortsQuery(db, siteId)
    .leftJoin('users as sender', 'sender.id', 'pick_shorts.handled_by')
    .leftJoin('users as restocker', 'restocker.id', 'pick_shorts.restocked_by')
    .where('pick_shorts.follow_up', 'replenish')
    .orderBy('pick_shorts.handled_at', 'desc')
    .orderBy('pick_shorts.id', 'desc')
    .limit(5000);
  if (!includeRestocked) q.whereNull('pick_shorts.restocked_at');
  const rows: (Omit<ReplenishmentItem, 'qtyShort'> & { qtyOrdered: number; qtyFound: number; id: number; waveId: number; tripId: number })[] = await q.select({
    ...SHORT_COLUMNS,
    shortId: 'pick_shorts.id',
    orderId: 'pick_lines.order_id',
    sentBy: 'sender.name',
    sentAt: 'pick_shorts.handled_at',
    restockedBy: 'restocker.name',
    restockedAt: 'pick_shorts.restocked_at',
  });
  return rows.map(({ qtyOrdered, qtyFound, id: _id, waveId: _waveId, tripId: _tripId, ...r }) => ({ ...r, qtyShort: qtyOrdered - qtyFound }));
}

/** The site's active pickers by name, and the trip each holds (assigned or picking). */
export async function sitePickersWithTrip(db: Q, siteId: number): Promise<{ id: number; name: string; tripId: number | null }[]> {
  const pickerRows: { id: number; name: string }[] = await db('users')
    .join('user_sites', 'user_sites.user_id', 'users.id')
    .where({ 'user_sites.site_id': siteId, 'users.role': 'picker', 'users.active': true })
    .orderBy('users.name')
    .select('users.id', 'users.name');
  const busy = await db('trips')
    .where({ site_id: siteId })
    .whereIn('status', ['assigned', 'picking'])
    .whereNotNull('picker_id')
    .select<{ id: number; picker_id: number }[]>('id', 'picker_id');
  const busyBy = new Map(busy.map((b) => [b.picker_id, b.id]));
  return pickerRows.map((p) => ({ id: p.id, name: p.name, tripId: busyBy.get(p.id) ?? null }));
}

export const getSiteTripRow = (db: Q, siteId: number, tripId: number): Promise<DbTripRow | undefined> =>
  db<DbTripRow>('trips').where({ id: tripId, site_id: siteId }).first();
export const getSiteWaveRow = (db: Q, siteId: number, waveId: number): Promise<DbWaveRow | undefined> =>
  db<DbWaveRow>('waves').where({ id: waveId, site_id: siteId }).first();

/** An active picker of the site, or undefined. */
export async function activeSitePicker(db: Q, siteId: number, pickerId: number): Promise<{ id: number; name: string } | undefined> {
  return db('users')
    .join('user_sites', 'user_sites.user_id', 'users.id')
    .where({ 'users.id': pickerId, 'users.role': 'picker', 'users.active': true, 'user_sites.site_id': siteId })
    .first<{ id: number; name: string } | undefined>('users.id', 'users.name');
}

/** Another trip of the site the picker holds (assigned or picking), if any. */
export async function otherActiveTripOf(db: Q, siteId: number, pickerId: number, tripId: number): Promise<{ id: number; n: number } | undefined> {
  return db('trips')
    .where({ picker_id: pickerId, site_id: siteId })
    .whereIn('status', ['assigned', 'picking'])
    .whereNot({ id: tripId })
    .first<{ id: number; n: number } | undefined>('id', 'n');
}

/** Gives the trip to `pickerId`: the former picker's assignment ends, a new one starts. */
export async function reassignTripRow(
  db: Q,
  trip: Pick<DbTripRow, 'id' | 'picker_id' | 'started_at'>,
  pickerId: number,
  assignedBy: number,
  at: string,
): Promise<void> {
  if (trip.picker_id !== null)
    await db('trip_assignments').where({ trip_id: trip.id, picker_id: trip.picker_id }).whereNull('ended_at').update({ ended_at: at });
  await db('trip_assignments').insert({ trip_id: trip.id, picker_id: pickerId, assigned_by: assignedBy, assigned_at: at });
  await db('trips')
    .where({ id: trip.id })
    .update({ picker_id: pickerId, status: trip.started_at ? 'picking' : 'assigned', assigned_at: at });
}

/** Cancels the trip's open lines and returns them. */
export async function cancelOpenLines(db: Q, tripId: number): Promise<DbLineRow[]> {
  const open: DbLineRow[] = await db<DbLineRow>('pick_lines').where({ trip_id: tripId, status: 'open' });
  await db('pick_lines').where({ trip_id: tripId, status: 'open' }).update({ status: 'cancelled' });
  return open;
}

/** Of these orders, those with a line already picked or reported short (something in a cart, or followed up). */
export async function ordersWithRecordedLines(db: Q, orderIds: number[]): Promise<number[]> {
  if (!orderIds.length) return [];
  return db('pick_lines').whereIn('order_id', orderIds).whereIn('status', ['picked', 'short']).distinct('order_id').pluck('order_id');
}

export const tripOrderIds = (db: Q, tripId: number): Promise<number[]> => db('trip_orders').where({ trip_id: tripId }).pluck('order_id');

/** These orders are done with what was picked (the rest of their lines was cancelled). */
export async function markOrdersDone(db: Q, orderIds: number[]): Promise<void> {
  if (orderIds.length) await db('orders').whereIn('id', orderIds).whereIn('status', ['planned', 'picking']).update({ status: 'done' });
}

/** These orders go back to the open pool; returns their refs, sorted. */
export async function reopenOrders(db: Q, orderIds: number[]): Promise<string[]> {
  if (!orderIds.length) return [];
  const refs: { ref: string }[] = await db('orders').whereIn('id', orderIds).orderBy('ref').select('ref');
  await db('orders').whereIn('id', orderIds).update({ status: 'open', wave_id: null });
  return refs.map((r) => r.ref);
}

/** Marks the trip cancelled with what was walked, and ends its open assignment. */
export async function closeTripCancelled(db: Q, trip: Pick<DbTripRow, 'id' | 'finished_at'>, walked: number | null, at: string): Promise<void> {
  await db('trips')
    .where({ id: trip.id })
    .update({ status: 'cancelled', cancelled_at: at, finished_at: trip.finished_at ?? at, walked_metres: walked });
}

export async function endOpenAssignments(db: Q, tripId: number, at: string): Promise<void> {
  await db('trip_assignments').where({ trip_id: tripId }).whereNull('ended_at').update({ ended_at: at });
}

export const unfinishedTripsOf = (db: Q, waveId: number): Promise<DbTripRow[]> =>
  db<DbTripRow>('trips').where({ wave_id: waveId }).whereNotIn('status', ['done', 'cancelled']);

export async function setWalkSeq(db: Q, stopId: number, seq: number): Promise<void> {
  await db('stops').where({ id: stopId }).update({ walk_seq: seq });
}

/** Ids of the trips still to be picked (released, assigned or picking) on waves planned on this plan. */
export async function openTripIdsOnPlan(db: Q, planId: number): Promise<number[]> {
  return db('trips').join('waves', 'waves.id', 'trips.wave_id').where('waves.plan_id', planId).whereIn('trips.status', OPEN_TRIP).pluck('trips.id');
}

export async function markRouteChanged(db: Q, tripId: number, at: string): Promise<void> {
  await db('trips').where({ id: tripId }).update({ route_changed_at: at });
}

export async function completeWaveRow(db: Q, waveId: number, at: string): Promise<void> {
  await db('waves').where({ id: waveId }).update({ status: 'completed', completed_at: at });
}

export async function unfinishedTripCount(db: Q, waveId: number): Promise<number> {
  const [{ n }] = (await db('trips').where({ wave_id: waveId }).whereNotIn('status', ['done', 'cancelled']).count<{ n: number }[]>({ n: '*' })) as [
    { n: number },
  ];
  return Number(n);
}

/** Completes the wave if it is still released or picking; false when it was not (already closed). */
export async function completeRunningWave(db: Q, waveId: number, at: string): Promise<boolean> {
  return (await db('waves').where({ id: waveId }).whereIn('status', ['released', 'picking']).update({ status: 'completed', completed_at: at })) > 0;
}

/** Claims the wave's report mail (once per wave); false when it was claimed before. */
export async function claimWaveReport(db: Q, waveId: number, at: string): Promise<boolean> {
  return (await db('waves').where({ id: waveId }).whereNull('report_mailed_at').update({ report_mailed_at: at })) === 1;
}

export interface DbShortRow {
  id: number;
  handled_at: string | null;
  line_id: number;
  qty_ordered: number;
  qty_found: number;
  follow_up: ShortFollowUp | null;
  repick_order_id: number | null;
  restocked_at: string | null;
}

export async function getSiteShort(db: Q, siteId: number, shortId: number): Promise<DbShortRow | undefined> {
  return db('pick_shorts')
    .where({ id: shortId, site_id: siteId })
    .first<DbShortRow | undefined>('id', 'handled_at', 'line_id', 'qty_ordered', 'qty_found', 'follow_up', 'repick_order_id', 'restocked_at');
}

/** The short recorded on a line, if any (a line has at most one). */
export async function shortOfLine(db: Q, lineId: number): Promise<Pick<DbShortRow, 'id' | 'follow_up' | 'repick_order_id'> | undefined> {
  return db('pick_shorts')
    .where({ line_id: lineId })
    .first<Pick<DbShortRow, 'id' | 'follow_up' | 'repick_order_id'> | undefined>('id', 'follow_up', 'repick_order_id');
}

export async function markShortHandled(
  db: Q,
  shortId: number,
  userId: number,
  at: string,
  followUp: ShortFollowUp = 'handled',
  repickOrderId: number | null = null,
): Promise<void> {
  await db('pick_shorts').where({ id: shortId }).update({ handled_at: at, handled_by: userId, follow_up: followUp, repick_order_id: repickOrderId });
}

export async function markShortRestocked(db: Q, shortId: number, userId: number, at: string): Promise<void> {
  await db('pick_shorts').where({ id: shortId }).update({ restocked_at: at, restocked_by: userId });
}

/* ---- The picker's tablet ---- */

/** When the picker's latest ended assignment of this trip ended (reassigned away), if any. */
export async function formerAssignmentEnd(db: Q, tripId: number, pickerId: number): Promise<string | null> {
  const r = await db('trip_assignments')
    .where({ trip_id: tripId, picker_id: pickerId })
    .whereNotNull('ended_at')
    .orderBy('ended_at', 'desc')
    .first<{ ended_at: string } | undefined>('ended_at');
  return r?.ended_at ?? null;
}

/** The picker's trip at the site (assigned or picking), earliest assigned first. */
export const activeTripOf = (db: Q, pickerId: number, siteId: number): Promise<DbTripRow | undefined> =>
  db<DbTripRow>('trips').where({ picker_id: pickerId, site_id: siteId }).whereIn('status', ACTIVE_TRIP).orderBy('assigned_at').first();

/** Released trips of live waves at the site that nobody holds. */
export async function releasedTripCount(db: Q, siteId: number): Promise<number> {
  const r = await db('trips')
    .join('waves', 'waves.id', 'trips.wave_id')
    .where({ 'trips.site_id': siteId, 'trips.status': 'released' })
    .whereIn('waves.status', ['released', 'picking'])
    .whereNull('trips.picker_id')
    .count<{ n: number }[]>({ n: '*' });
  return Number(r[0]!.n);
}

/** The next trip to take: oldest due first (no due date last), then the older wave, then trip number. */
export async function nextReleasedTripId(db: Q, siteId: number): Promise<number | undefined> {
  const next = await db('trips')
    .join('waves', 'waves.id', 'trips.wave_id')
    .where({ 'trips.site_id': siteId, 'trips.status': 'released' })
    .whereNull('trips.picker_id')
    .whereIn('waves.status', ['released', 'picking'])
    .orderByRaw('trips.due IS NULL, trips.due ASC, waves.created_at ASC, waves.id ASC, trips.n ASC')
    .first<{ id: number } | undefined>('trips.id');
  return next?.id;
}

/** Claims a released trip nobody holds for the picker: one conditional UPDATE; false when another picker was first. */
export async function claimTrip(db: Q, tripId: number, pickerId: number, at: string): Promise<boolean> {
  const claimed = await db('trips')
    .where({ id: tripId, status: 'released' })
    .whereNull('picker_id')
    .update({ status: 'assigned', picker_id: pickerId, assigned_at: at });
  if (claimed !== 1) return false;
  await db('trip_assignments').insert({ trip_id: tripId, picker_id: pickerId, assigned_by: pickerId, assigned_at: at });
  return true;
}

/** The tote numbers of a trip, ascending. */
export async function totesOfTrip(db: Q, tripId: number): Promise<number[]> {
  return (await db('pick_lines').where({ trip_id: tripId }).distinct('tote').orderBy('tote')).map((r: { tote: number }) => r.tote);
}

export async function setCartReady(db: Q, tripId: number, at: string): Promise<void> {
  await db('trips').where({ id: tripId }).update({ cart_ready_at: at });
}

/** The trip, its wave and its orders move to picking (started at `at`). */
export async function markTripStarted(db: Q, trip: Pick<DbTripRow, 'id' | 'wave_id'>, at: string): Promise<void> {
  await db('trips').where({ id: trip.id }).update({ status: 'picking', started_at: at });
  await db('waves').where({ id: trip.wave_id, status: 'released' }).update({ status: 'picking' });
  const orderIds = db('trip_orders').where({ trip_id: trip.id }).select('order_id');
  await db('orders').whereIn('id', orderIds).where({ status: 'planned' }).update({ status: 'picking' });
}

/** The trip is done with what was walked; its orders are done. */
export async function markTripDone(db: Q, tripId: number, walked: number | null, at: string): Promise<void> {
  await db('trips').where({ id: tripId }).update({ status: 'done', finished_at: at, walked_metres: walked });
  const orderIds = db('trip_orders').where({ trip_id: tripId }).select('order_id');
  await db('orders').whereIn('id', orderIds).whereIn('status', ['planned', 'picking']).update({ status: 'done' });
}

export async function storedRequest(db: Q, userId: number, key: string): Promise<{ request_hash: string; response: string } | undefined> {
  return db('pick_requests')
    .where({ user_id: userId, idem_key: key })
    .first<{ request_hash: string; response: string } | undefined>('request_hash', 'response');
}

export async function storeRequest(
  db: Q,
  row: { user_id: number; idem_key: string; request_hash: string; trip_id: number; status: number; response: string; created_at: string },
): Promise<void> {
  await db('pick_requests').insert(row);
}

export const getLineRow = (db: Q, lineId: number): Promise<DbLineRow | undefined> => db<DbLineRow>('pick_lines').where({ id: lineId }).first();
export const getLineOfTrip = (db: Q, tripId: number, lineId: number): Promise<DbLineRow | undefined> =>
  db<DbLineRow>('pick_lines').where({ id: lineId, trip_id: tripId }).first();

export async function userNameOf(db: Q, userId: number): Promise<string | undefined> {
  return (await db('users').where({ id: userId }).first<{ name: string } | undefined>('name'))?.name;
}

export async function stopNumber(db: Q, stopId: number): Promise<number> {
  return (await db('stops').where({ id: stopId }).first<{ n: number }>('n'))!.n;
}

/** The latest tablet time of a picked line of the trip other than `lineId`. */
export async function lastTabletPick(db: Q, tripId: number, lineId: number): Promise<string | null> {
  const last = await db('pick_lines').where({ trip_id: tripId, status: 'picked' }).whereNot({ id: lineId }).max<{ m: string | null }[]>({ m: 'tablet_at' });
  return last[0]?.m ?? null;
}

/** Open lines of the trip (of one stop when given). */
export async function openLineCount(db: Q, tripId: number, stopId?: number): Promise<number> {
  // trip_id first: the (trip_id, stop_id) index serves this; stop_id alone would scan every line.
  const open = await db('pick_lines')
    .where({ trip_id: tripId, ...(stopId !== undefined && { stop_id: stopId }), status: 'open' })
    .count<{ n: number }[]>({ n: '*' });
  return Number(open[0]!.n);
}

/** Marks an open stop done, numbered after the trip's last done stop. */
export async function markStopDone(db: Q, tripId: number, stopId: number, at: string): Promise<void> {
  const seq = await db('stops').where({ trip_id: tripId }).max<{ m: number | null }[]>({ m: 'done_seq' });
  await db('stops')
    .where({ id: stopId, status: 'open' })
    .update({ status: 'done', done_at: at, done_seq: (seq[0]!.m ?? 0) + 1 });
}

export async function confirmScanOf(db: Q, siteId: number): Promise<'bin' | 'sku'> {
  return (await db('sites').where({ id: siteId }).first<{ confirm_scan: 'bin' | 'sku' }>('confirm_scan'))!.confirm_scan;
}

export async function settleOpenLine(db: Q, lineId: number, outcome: Record<string, unknown>): Promise<void> {
  await db('pick_lines').where({ id: lineId, status: 'open' }).update(outcome);
}

export async function insertShort(
  db: Q,
  row: {
    site_id: number;
    wave_id: number;
    trip_id: number;
    line_id: number;
    qty_ordered: number;
    qty_found: number;
    reason: string;
    reported_by: number;
    reported_at: string;
  },
): Promise<void> {
  await db('pick_shorts').insert(row);
}

export async function markStopSkipped(db: Q, stopId: number, at: string): Promise<void> {
  await db('stops').where({ id: stopId }).update({ skipped_at: at });
}

/** The line goes back to open (its short report removed) and its stop with it. */
export async function reopenLineRow(db: Q, line: Pick<DbLineRow, 'id' | 'stop_id'>): Promise<void> {
  await db('pick_lines')
    .where({ id: line.id })
    .update({ status: 'open', picked_qty: null, short_reason: null, confirmed_by: null, confirmed_at: null, received_at: null, tablet_at: null });
  await db('pick_shorts').where({ line_id: line.id }).del();
  await db('stops').where({ id: line.stop_id }).update({ status: 'open', done_at: null, done_seq: null });
}

/* ---- Signed-in pickers and automatic assignment ---- */

/** Active pickers of the site with a live session started after `sinceS` (Unix seconds), by name; the latest sign-in each. */
export async function signedInPickerRows(
  db: Q,
  siteId: number,
  sinceS: number,
): Promise<{ id: number; name: string; badge: string | null; signed_in_at: string }[]> {
  return db('sessions')
    .join('users', 'users.id', 'sessions.user_id')
    .join('user_sites', 'user_sites.user_id', 'users.id')
    .where({ 'users.role': 'picker', 'users.active': true, 'user_sites.site_id': siteId })
    .whereNull('sessions.revoked_at')
    .where('sessions.auth_time', '>=', sinceS)
    .groupBy('users.id', 'users.name', 'users.badge')
    .orderBy('users.name')
    .select('users.id', 'users.name', 'users.badge')
    .max({ signed_in_at: 'sessions.created_at' });
}

/** The trips of the site these pickers hold (assigned or picking). */
export async function heldTripsOf(db: Q, siteId: number, pickerIds: number[]): Promise<{ id: number; n: number; wave_id: number; picker_id: number }[]> {
  return db('trips')
    .where({ site_id: siteId })
    .whereIn('status', ['assigned', 'picking'])
    .whereIn('picker_id', pickerIds)
    .select('id', 'n', 'wave_id', 'picker_id');
}

/** When each picker last finished or dropped a trip (ISO), '' when never. */
export async function lastFreedAt(db: Q, pickerIds: number[]): Promise<Map<number, string>> {
  const rows: { picker_id: number; at: string | null }[] = await db('trips')
    .whereIn('picker_id', pickerIds)
    .groupBy('picker_id')
    .select('picker_id')
    .max({ at: 'finished_at' });
  return new Map(rows.map((r) => [r.picker_id, r.at ?? '']));
}

/** The wave's released trips nobody holds, by trip number. */
export const waitingTripsOf = (db: Q, waveId: number): Promise<{ id: number; n: number }[]> =>
  db('trips').where({ wave_id: waveId, status: 'released' }).whereNull('picker_id').orderBy('n').select('id', 'n');

/* ---- Re-pick orders made from shorts ---- */

/** The order a short line came from: reference, due time and priority carry over to its re-pick. */
export async function orderOfLine(
  db: Q,
  siteId: number,
  orderId: number,
): Promise<{ id: number; ref: string; due: string | null; priority: number | null } | undefined> {
  return db('orders')
    .where({ id: orderId, site_id: siteId })
    .first<{ id: number; ref: string; due: string | null; priority: number | null } | undefined>('id', 'ref', 'due', 'priority');
}

/** References of the site's orders that start with `prefix` (re-pick references already taken). */
export async function orderRefsStartingWith(db: Q, siteId: number, prefix: string): Promise<string[]> {
  // LIKE treats _ and % as wildcards: the caller checks the exact prefix.
  return db('orders')
    .where({ site_id: siteId })
    .andWhere('ref', 'like', `${prefix.replace(/[%_]/g, '_')}%`)
    .pluck('ref');
}
