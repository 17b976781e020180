/** The waves tables as planning, release, the wave list and the print view read and write them. */
import type { TripDetail, WaveSummary } from '../../shared/waves';
import type { Q } from '../db/knex';
import { ordersOfSiteBy, type DbOrderRow } from '../orders/orders.repository';
import type { DbLineRow } from '../picking/picking.repository';

export interface DbReleasedWaveRow {
  id: number;
  site_id: number;
  plan_id: number;
  name: string;
  status: WaveSummary['status'];
  cart_name: string;
  batching: WaveSummary['batching'];
  routing_method: WaveSummary['method'];
  routing_improve: WaveSummary['improve'];
  orders_count: number;
  lines_count: number;
  planned_metres: number;
  lower_bound_metres: number;
  single_metres: number;
  s_shape_metres: number | null;
  est_seconds: number;
  notes: string;
  created_by: number | null;
  created_at: string;
  completed_at: string | null;
  release_key: string;
  depot_idx: number;
}

/** A wave row with its plan version, creator's name and trip count, as the list shows it. */
export type DbWaveListRow = DbReleasedWaveRow & { plan_version: number | null; creator: string | null; trips_count: number };

export interface DbWaveTripRow {
  id: number;
  wave_id: number;
  n: number;
  status: TripDetail['status'];
  picker_id: number | null;
  picker_name: string | null;
  planned_metres: number;
  lower_bound_metres: number;
  est_seconds: number;
  totes: number;
  kg: number;
  litres: number;
}

/** The site's orders with these ids. */
export const ordersOfSite = (db: Q, siteId: number, orderIds: number[]): Promise<DbOrderRow[]> => ordersOfSiteBy(db, siteId, 'id', orderIds);

export async function waveByReleaseKey(db: Q, siteId: number, releaseKey: string): Promise<DbReleasedWaveRow | undefined> {
  return db<DbReleasedWaveRow>('waves').where({ site_id: siteId, release_key: releaseKey }).first();
}

/** Of these orders, the ids still open. */
export async function openOrderIds(db: Q, orderIds: number[]): Promise<number[]> {
  return db('orders').whereIn('id', orderIds).andWhere({ status: 'open' }).pluck('id');
}

/** The due dates of these orders, earliest first (orders without one left out). */
export async function dueDatesOf(db: Q, orderIds: number[]): Promise<string[]> {
  return ((await db<DbOrderRow>('orders').whereIn('id', orderIds).pluck('due')) as (string | null)[]).filter((d): d is string => !!d).sort();
}

const insertId = async (db: Q, table: string, row: Record<string, unknown>): Promise<number> => {
  const [r] = await db(table).insert(row, 'id');
  return (r as { id: number }).id;
};

export const insertWave = (db: Q, row: Record<string, unknown>): Promise<number> => insertId(db, 'waves', row);
export const insertTrip = (db: Q, row: Record<string, unknown>): Promise<number> => insertId(db, 'trips', row);
export const insertStop = (db: Q, row: Record<string, unknown>): Promise<number> => insertId(db, 'stops', row);

export async function insertTripOrder(db: Q, row: { trip_id: number; order_id: number | undefined; totes: string }): Promise<void> {
  await db('trip_orders').insert(row);
}

export async function insertPickLine(db: Q, row: Record<string, unknown>): Promise<void> {
  await db('pick_lines').insert(row);
}

/** The released wave's orders leave the open pool. */
export async function markOrdersPlanned(db: Q, orderIds: number[], waveId: number): Promise<void> {
  await db('orders').whereIn('id', orderIds).update({ status: 'planned', wave_id: waveId });
}

function waveQuery(db: Q, siteId: number) {
  return db('waves')
    .leftJoin('floor_plans', 'floor_plans.id', 'waves.plan_id')
    .leftJoin('users', 'users.id', 'waves.created_by')
    .where('waves.site_id', siteId)
    .select(
      'waves.*',
      'floor_plans.version as plan_version',
      'users.name as creator',
      db.raw('(select count(*) from trips where trips.wave_id = waves.id) as trips_count'),
    );
}

/** The site's latest 200 waves, newest first. */
export async function listWaveRows(db: Q, siteId: number, status?: WaveSummary['status']): Promise<DbWaveListRow[]> {
  const q = waveQuery(db, siteId).orderBy('waves.id', 'desc').limit(200);
  if (status) q.andWhere('waves.status', status);
  return q;
}

export async function getWaveListRow(db: Q, siteId: number, waveId: number): Promise<DbWaveListRow | undefined> {
  return waveQuery(db, siteId).andWhere('waves.id', waveId).first();
}

/** Trips matching `where`, by number, with the refs of their orders and their stop and line counts. */
export async function tripRows(db: Q, where: Record<string, unknown>) {
  const trips: DbWaveTripRow[] = await db('trips')
    .leftJoin('users', 'users.id', 'trips.picker_id')
    .where(where)
    .orderBy('trips.n')
    .select('trips.*', 'users.name as picker_name');
  const ids = trips.map((t) => t.id);
  const orders: { trip_id: number; ref: string }[] = ids.length
    ? await db('trip_orders').join('orders', 'orders.id', 'trip_orders.order_id').whereIn('trip_id', ids).select('trip_id', 'orders.ref')
    : [];
  const counts: { trip_id: number; stops: number; lines: number }[] = ids.length
    ? await db('trips')
        .whereIn('trips.id', ids)
        .select(
          'trips.id as trip_id',
          db.raw('(select count(*) from stops where stops.trip_id = trips.id) as stops'),
          db.raw('(select count(*) from pick_lines where pick_lines.trip_id = trips.id) as lines'),
        )
    : [];
  return { trips, orders, counts };
}

export async function waveOfTrip(db: Q, tripId: number): Promise<DbReleasedWaveRow | undefined> {
  const trip = await db('trips').where({ id: tripId }).first<{ wave_id: number } | undefined>();
  return trip ? db<DbReleasedWaveRow>('waves').where({ id: trip.wave_id }).first() : undefined;
}

export interface DbPrintStopRow {
  id: number;
  n: number;
  x_m: number;
  y_m: number;
  bins: string;
  status: 'open' | 'done';
  node: number;
}
/** A pick line as the print view reads it (the whole row). */
export type DbPrintLineRow = DbLineRow;

/** What every view of a trip starts with: id, number, status and picker. */
export const tripHead = <S extends string>(t: { id: number; n: number; status: S; picker_id: number | null; picker_name: string | null }) => ({
  id: t.id,
  n: t.n,
  status: t.status,
  pickerId: t.picker_id,
  pickerName: t.picker_name,
});

/** A trip's stops by printed number and its pick lines, as the print view shows them. */
export async function printStopsAndLines(db: Q, tripId: number): Promise<{ stops: DbPrintStopRow[]; lines: DbPrintLineRow[] }> {
  const stops: DbPrintStopRow[] = await db('stops').where({ trip_id: tripId }).orderBy('n');
  const lines: DbPrintLineRow[] = await db('pick_lines').where({ trip_id: tripId }).orderBy('id');
  return { stops, lines };
}

export async function waveOfSite(db: Q, siteId: number, waveId: number): Promise<DbReleasedWaveRow | undefined> {
  return db<DbReleasedWaveRow>('waves').where({ id: waveId, site_id: siteId }).first();
}

/** How many of the wave's lines were picked, shorted or cancelled (anything but open). */
export async function recordedLineCount(db: Q, waveId: number): Promise<number> {
  const picked = await db('pick_lines')
    .join('trips', 'trips.id', 'pick_lines.trip_id')
    .where('trips.wave_id', waveId)
    .whereNot('pick_lines.status', 'open')
    .count({ n: '*' });
  return Number(picked[0]!.n);
}

/** Cancels the wave, its trips and lines; its orders go back to the open pool. */
export async function cancelWaveRows(db: Q, siteId: number, waveId: number): Promise<void> {
  await db('waves').where({ id: waveId }).update({ status: 'cancelled', cancelled_at: new Date().toISOString() });
  await db('trips').where({ wave_id: waveId }).update({ status: 'cancelled' });
  await db('pick_lines')
    .whereIn('trip_id', db('trips').where({ wave_id: waveId }).select('id'))
    .update({ status: 'cancelled' });
  await db('orders').where({ wave_id: waveId, site_id: siteId }).update({ status: 'open', wave_id: null });
}

/** The site's released or picking waves on any plan but `exceptPlanId`, with their plan version and open trips. */
export async function runningWavesOffPlan(
  db: Q,
  siteId: number,
  exceptPlanId: number,
): Promise<{ id: number; name: string; status: string; plan_id: number; version: number | null; open_trips: number }[]> {
  return db('waves as w')
    .join('floor_plans as p', 'p.id', 'w.plan_id')
    .where('w.site_id', siteId)
    .whereIn('w.status', ['released', 'picking'])
    .whereNot('w.plan_id', exceptPlanId)
    .orderBy('w.id')
    .select('w.id', 'w.name', 'w.status', 'w.plan_id', 'p.version')
    .select(db.raw("(select count(*) from trips t where t.wave_id = w.id and t.status not in ('done', 'cancelled')) as open_trips"));
}
