/** Rows of slotting runs, uploaded histories and the SKU bin history. One DB operation per function. */
import type { Knex } from 'knex';
import type { Q } from '../db/knex';
import type { HistoryOrder } from '../core/slotting/types';

export interface DbSlottingRunRow {
  id: number;
  site_id: number;
  name: string;
  method: string;
  inputs: string;
  status: 'queued' | 'running' | 'done' | 'failed' | 'cancelled';
  results: string | null;
  error: string | null;
  created_by: number | null;
  created_at: string;
  finished_at: string | null;
  applied_moves: number | null;
  applied_by: number | null;
  applied_at: string | null;
}

/** Inserted id on SQLite and PostgreSQL alike. */
const idOf = (r: unknown): number => (typeof r === 'object' && r !== null ? (r as { id: number }).id : (r as number));

export async function insertRun(
  db: Q,
  row: Pick<DbSlottingRunRow, 'site_id' | 'name' | 'method' | 'inputs' | 'status' | 'created_by' | 'created_at'>,
): Promise<number> {
  const [r] = await db('slotting_runs').insert(row, ['id']);
  return idOf(r);
}

export const getRunRow = (db: Q, siteId: number, id: number): Promise<(DbSlottingRunRow & { creator: string | null }) | undefined> =>
  db('slotting_runs')
    .leftJoin('users', 'users.id', 'slotting_runs.created_by')
    .where({ 'slotting_runs.site_id': siteId, 'slotting_runs.id': id })
    .first('slotting_runs.*', 'users.name as creator');

export const listRunRows = (db: Q, siteId: number): Promise<(Omit<DbSlottingRunRow, 'results' | 'inputs'> & { creator: string | null })[]> =>
  db('slotting_runs')
    .leftJoin('users', 'users.id', 'slotting_runs.created_by')
    .where({ 'slotting_runs.site_id': siteId })
    .orderBy('slotting_runs.id', 'desc')
    .limit(200)
    .select(
      'slotting_runs.id',
      'slotting_runs.site_id',
      'slotting_runs.name',
      'slotting_runs.method',
      'slotting_runs.status',
      'slotting_runs.error',
      'slotting_runs.created_by',
      'slotting_runs.created_at',
      'slotting_runs.finished_at',
      'slotting_runs.applied_moves',
      'slotting_runs.applied_by',
      'slotting_runs.applied_at',
      'users.name as creator',
    );

export async function setRun(
  db: Q,
  id: number,
  patch: Partial<Pick<DbSlottingRunRow, 'status' | 'results' | 'error' | 'finished_at' | 'applied_moves' | 'applied_by' | 'applied_at'>>,
): Promise<void> {
  await db('slotting_runs').where({ id }).update(patch);
}

export async function insertHistory(
  db: Q,
  row: { site_id: number; file_name: string; orders: HistoryOrder[]; created_by: number; created_at: string },
): Promise<number> {
  const [r] = await db('slotting_histories').insert({ ...row, orders: JSON.stringify(row.orders), order_count: row.orders.length }, ['id']);
  return idOf(r);
}

export async function getHistory(db: Q, siteId: number, id: number): Promise<HistoryOrder[] | null> {
  const r: { orders: string } | undefined = await db('slotting_histories').where({ site_id: siteId, id }).first('orders');
  return r ? (JSON.parse(r.orders) as HistoryOrder[]) : null;
}

/** Lines picked (or short-picked with something taken) on the site between two instants, by order. */
export async function recordedPickLines(
  db: Q,
  siteId: number,
  fromIso: string,
  toIso: string,
): Promise<{ order_ref: string; sku: string; picked_qty: number | null; qty: number; confirmed_at: string }[]> {
  return db('pick_lines')
    .join('trips', 'trips.id', 'pick_lines.trip_id')
    .join('waves', 'waves.id', 'trips.wave_id')
    .where('waves.site_id', siteId)
    .whereIn('pick_lines.status', ['picked', 'short'])
    .where('pick_lines.confirmed_at', '>=', fromIso)
    .where('pick_lines.confirmed_at', '<', toIso)
    .orderBy('pick_lines.confirmed_at')
    .select('pick_lines.order_ref', 'pick_lines.sku', 'pick_lines.picked_qty', 'pick_lines.qty', 'pick_lines.confirmed_at');
}

export async function skuRowsOf(
  db: Q,
  siteId: number,
): Promise<{ sku: string; description: string; bin: string; unit_weight_kg: number; unit_volume_l: number }[]> {
  return db('skus').where({ site_id: siteId }).orderBy('sku').select('sku', 'description', 'bin', 'unit_weight_kg', 'unit_volume_l');
}

export async function setSkuBin(trx: Knex.Transaction, siteId: number, sku: string, bin: string, at: string): Promise<void> {
  await trx('skus').where({ site_id: siteId, sku }).update({ bin, updated_at: at });
}

export async function insertBinHistory(
  trx: Knex.Transaction,
  rows: { site_id: number; sku: string; from_bin: string; to_bin: string; source: string; changed_by: number; changed_at: string }[],
): Promise<void> {
  if (rows.length > 0) await trx.batchInsert('sku_bin_history', rows, 200);
}

/** Waves not yet finished, with the SKUs on their open lines: moving those SKUs now would send pickers to the wrong bin. */
export async function openWaveSkus(db: Q, siteId: number): Promise<{ wave: string; sku: string }[]> {
  return db('pick_lines')
    .join('trips', 'trips.id', 'pick_lines.trip_id')
    .join('waves', 'waves.id', 'trips.wave_id')
    .where('waves.site_id', siteId)
    .where('pick_lines.status', 'open')
    .distinct('waves.name as wave', 'pick_lines.sku');
}
