/** Rows of the waves tables as picking reads them, and the trip as the tablet sees it. */
import type { Q } from '../db/knex';
import type { BoardShort, PickStop, PickTrip } from '../../shared/picking';
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

export const getTripRow = (db: Q, id: number): Promise<DbTripRow | undefined> => db<DbTripRow>('trips').where({ id }).first();
export const getWaveRow = (db: Q, id: number): Promise<DbWaveRow | undefined> => db<DbWaveRow>('waves').where({ id }).first();
/** A trip's stops in walking order (the printed number `n` never changes; the walking order may). */
export const stopsOf = (db: Q, tripId: number): Promise<DbStopRow[]> => db<DbStopRow>('stops').where({ trip_id: tripId }).orderByRaw('COALESCE(walk_seq, n), n, id');

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
  return raw.split(',').map((s) => s.trim()).filter(Boolean);
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
  const orders: { ref: string }[] = await db('trip_orders').join('orders', 'orders.id', 'trip_orders.order_id').where('trip_orders.trip_id', tripId).orderBy('orders.ref').select('orders.ref');
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
  const rows = (await db('trips').where({ id: tripId }).update({ revision: db.raw('revision + 1') }, ['revision'])) as { revision: number }[];
  return rows[0]!.revision;
}

export function lineView(l: DbLineRow) {
  return { id: l.id, orderRef: l.order_ref, sku: l.sku, description: l.description, bin: l.bin, qty: l.qty, tote: l.tote, status: l.status, pickedQty: l.picked_qty, shortReason: l.short_reason };
}

/* ---- The live board and the supervisor's actions on it ---- */

/** Waves on the site's board: released or picking, and those finished since `since`. */
export async function boardWaveRows(db: Q, siteId: number, since: string): Promise<DbWaveRow[]> {
  return db<DbWaveRow>('waves')
    .where({ site_id: siteId })
    .andWhere((q) => q.whereIn('status', ['released', 'picking']).orWhere((q2) => q2.whereIn('status', ['completed', 'cancelled']).andWhere('completed_at', '>=', since)))
    .orderBy('created_at');
}

export type BoardLineRow = Pick<DbLineRow, 'id' | 'trip_id' | 'stop_id' | 'status' | 'short_reason' | 'order_ref' | 'sku' | 'bin' | 'qty'>;

/** The trips of these waves (with the picker's name), their stops and their lines. */
export async function boardTripRows(db: Q, waveIds: number[]): Promise<{ trips: (DbTripRow & { picker_name: string | null })[]; stops: DbStopRow[]; lines: BoardLineRow[] }> {
  const trips: (DbTripRow & { picker_name: string | null })[] = waveIds.length
    ? await db('trips').leftJoin('users', 'users.id', 'trips.picker_id').whereIn('trips.wave_id', waveIds).orderBy(['trips.wave_id', 'trips.n']).select('trips.*', 'users.name as picker_name')
    : [];
  const tripIds = trips.map((t) => t.id);
  const stops: DbStopRow[] = tripIds.length ? await db<DbStopRow>('stops').whereIn('trip_id', tripIds) : [];
  const lines: BoardLineRow[] = tripIds.length
    ? await db('pick_lines').whereIn('trip_id', tripIds).select('id', 'trip_id', 'stop_id', 'status', 'short_reason', 'order_ref', 'sku', 'bin', 'qty')
    : [];
  return { trips, stops, lines };
}

/** Shorts of the site nobody has handled yet, oldest first. */
export async function unhandledShorts(db: Q, siteId: number): Promise<BoardShort[]> {
  const rows: (BoardShort & { line_status: string })[] = await db('pick_shorts')
    .join('pick_lines', 'pick_lines.id', 'pick_shorts.line_id')
    .join('trips', 'trips.id', 'pick_shorts.trip_id')
    .join('waves', 'waves.id', 'pick_shorts.wave_id')
    .leftJoin('users', 'users.id', 'pick_shorts.reported_by')
    .where('pick_shorts.site_id', siteId)
    .whereNull('pick_shorts.handled_at')
    .orderBy('pick_shorts.reported_at')
    .select({
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
      reportedBy: 'users.name',
      reportedAt: 'pick_shorts.reported_at',
      line_status: 'pick_lines.status',
    });
  return rows.map(({ line_status: _s, ...s }) => s);
}

/** The site's active pickers by name, and the trip each holds (assigned or picking). */
export async function sitePickersWithTrip(db: Q, siteId: number): Promise<{ id: number; name: string; tripId: number | null }[]> {
  const pickerRows: { id: number; name: string }[] = await db('users')
    .join('user_sites', 'user_sites.user_id', 'users.id')
    .where({ 'user_sites.site_id': siteId, 'users.role': 'picker', 'users.active': true })
    .orderBy('users.name')
    .select('users.id', 'users.name');
  const busy = await db('trips').where({ site_id: siteId }).whereIn('status', ['assigned', 'picking']).whereNotNull('picker_id').select<{ id: number; picker_id: number }[]>('id', 'picker_id');
  const busyBy = new Map(busy.map((b) => [b.picker_id, b.id]));
  return pickerRows.map((p) => ({ id: p.id, name: p.name, tripId: busyBy.get(p.id) ?? null }));
}

export const getSiteTripRow = (db: Q, siteId: number, tripId: number): Promise<DbTripRow | undefined> => db<DbTripRow>('trips').where({ id: tripId, site_id: siteId }).first();
export const getSiteWaveRow = (db: Q, siteId: number, waveId: number): Promise<DbWaveRow | undefined> => db<DbWaveRow>('waves').where({ id: waveId, site_id: siteId }).first();

/** An active picker of the site, or undefined. */
export async function activeSitePicker(db: Q, siteId: number, pickerId: number): Promise<{ id: number; name: string } | undefined> {
  return db('users').join('user_sites', 'user_sites.user_id', 'users.id').where({ 'users.id': pickerId, 'users.role': 'picker', 'users.active': true, 'user_sites.site_id': siteId }).first<{ id: number; name: string } | undefined>('users.id', 'users.name');
}

/** Another trip of the site the picker holds (assigned or picking), if any. */
export async function otherActiveTripOf(db: Q, siteId: number, pickerId: number, tripId: number): Promise<{ id: number; n: number } | undefined> {
  return db('trips').where({ picker_id: pickerId, site_id: siteId }).whereIn('status', ['assigned', 'picking']).whereNot({ id: tripId }).first<{ id: number; n: number } | undefined>('id', 'n');
}

/** Gives the trip to `pickerId`: the former picker's assignment ends, a new one starts. */
export async function reassignTripRow(db: Q, trip: Pick<DbTripRow, 'id' | 'picker_id' | 'started_at'>, pickerId: number, assignedBy: number, at: string): Promise<void> {
  if (trip.picker_id !== null) await db('trip_assignments').where({ trip_id: trip.id, picker_id: trip.picker_id }).whereNull('ended_at').update({ ended_at: at });
  await db('trip_assignments').insert({ trip_id: trip.id, picker_id: pickerId, assigned_by: assignedBy, assigned_at: at });
  await db('trips').where({ id: trip.id }).update({ picker_id: pickerId, status: trip.started_at ? 'picking' : 'assigned', assigned_at: at });
}

/** Cancels the trip's open lines and returns them. */
export async function cancelOpenLines(db: Q, tripId: number): Promise<DbLineRow[]> {
  const open: DbLineRow[] = await db<DbLineRow>('pick_lines').where({ trip_id: tripId, status: 'open' });
  await db('pick_lines').where({ trip_id: tripId, status: 'open' }).update({ status: 'cancelled' });
  return open;
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
  await db('trips').where({ id: trip.id }).update({ status: 'cancelled', cancelled_at: at, finished_at: trip.finished_at ?? at, walked_metres: walked });
}

export async function endOpenAssignments(db: Q, tripId: number, at: string): Promise<void> {
  await db('trip_assignments').where({ trip_id: tripId }).whereNull('ended_at').update({ ended_at: at });
}

export const unfinishedTripsOf = (db: Q, waveId: number): Promise<DbTripRow[]> => db<DbTripRow>('trips').where({ wave_id: waveId }).whereNotIn('status', ['done', 'cancelled']);

export async function completeWaveRow(db: Q, waveId: number, at: string): Promise<void> {
  await db('waves').where({ id: waveId }).update({ status: 'completed', completed_at: at });
}

export async function getSiteShort(db: Q, siteId: number, shortId: number): Promise<{ id: number; handled_at: string | null; line_id: number } | undefined> {
  return db('pick_shorts').where({ id: shortId, site_id: siteId }).first<{ id: number; handled_at: string | null; line_id: number } | undefined>('id', 'handled_at', 'line_id');
}

export async function markShortHandled(db: Q, shortId: number, userId: number, at: string): Promise<void> {
  await db('pick_shorts').where({ id: shortId }).update({ handled_at: at, handled_by: userId });
}
