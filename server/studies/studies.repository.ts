/** Rows of the studies table and the recorded waves a study reads. One DB operation per function. */
import type { Q } from '../db/knex';
import { StudyInputs, StudyResults, type StudyDetail, type StudyStatus, type StudySummary } from '../../shared/studies';

export interface DbStudyRow {
  id: number;
  site_id: number;
  name: string;
  kind: 'recorded' | 'generated';
  seed: number;
  inputs: string;
  status: StudyStatus;
  results: string | null;
  error: string | null;
  rerun_of: number | null;
  created_by: number | null;
  created_at: string;
  finished_at: string | null;
  archived_at: string | null;
}

export async function insertStudy(db: Q, row: Omit<DbStudyRow, 'id' | 'results' | 'error' | 'finished_at' | 'archived_at'>): Promise<number> {
  const [{ id }] = await db('studies').insert(row, 'id');
  return id as number;
}

export const getStudyRow = (db: Q, siteId: number, id: number): Promise<(DbStudyRow & { creator: string | null }) | undefined> =>
  db<DbStudyRow>('studies')
    .leftJoin('users', 'users.id', 'studies.created_by')
    .where({ 'studies.site_id': siteId, 'studies.id': id })
    .first('studies.*', 'users.name as creator');

/** The site's studies, newest first; archived ones only when `withArchived`. */
export const listStudyRows = (db: Q, siteId: number, withArchived: boolean): Promise<(Omit<DbStudyRow, 'results' | 'inputs'> & { creator: string | null })[]> =>
  db('studies')
    .leftJoin('users', 'users.id', 'studies.created_by')
    .where({ 'studies.site_id': siteId })
    .modify((q) => {
      if (!withArchived) q.whereNull('studies.archived_at');
    })
    .orderBy('studies.id', 'desc')
    .select(
      'studies.id',
      'studies.site_id',
      'studies.name',
      'studies.kind',
      'studies.seed',
      'studies.status',
      'studies.error',
      'studies.rerun_of',
      'studies.created_by',
      'studies.created_at',
      'studies.finished_at',
      'studies.archived_at',
      'users.name as creator',
    );

export async function setStudyStatus(
  db: Q,
  id: number,
  patch: Partial<Pick<DbStudyRow, 'status' | 'results' | 'error' | 'finished_at' | 'archived_at'>>,
): Promise<void> {
  await db('studies').where({ id }).update(patch);
}

/** Summary of a row; `live` is the in-memory progress of a study still running. */
export function toSummary(
  r: Omit<DbStudyRow, 'results' | 'inputs'> & { creator: string | null },
  live?: { progress: number; phase: string | null },
): StudySummary {
  return {
    id: r.id,
    name: r.name,
    kind: r.kind,
    status: r.status,
    seed: r.seed,
    progress: r.status === 'done' ? 1 : (live?.progress ?? 0),
    phase: live?.phase ?? null,
    createdBy: r.creator,
    createdAt: r.created_at,
    finishedAt: r.finished_at,
    rerunOf: r.rerun_of,
    error: r.error,
    archivedAt: r.archived_at,
  };
}

export function toDetail(r: DbStudyRow & { creator: string | null }, live?: { progress: number; phase: string | null }): StudyDetail {
  return {
    ...toSummary(r, live),
    inputs: StudyInputs.parse(JSON.parse(r.inputs)),
    results: r.results ? StudyResults.parse(JSON.parse(r.results)) : null,
  };
}

export interface DbRecordedWave {
  id: number;
  name: string;
  plan_id: number;
  depot_idx: number;
  cart_totes: number;
  cart_max_kg: number;
  cart_max_litres: number;
  created_at: string;
}

/** Released waves (not cancelled) by id, or created within [from, to] (dates, inclusive). */
export function recordedWaves(db: Q, siteId: number, sel: { waveIds?: number[]; from?: string; to?: string }): Promise<DbRecordedWave[]> {
  const q = db('waves')
    .where({ site_id: siteId })
    .whereNot({ status: 'cancelled' })
    .orderBy('id')
    .select('id', 'name', 'plan_id', 'depot_idx', 'cart_totes', 'cart_max_kg', 'cart_max_litres', 'created_at');
  if (sel.waveIds?.length) q.whereIn('id', sel.waveIds);
  if (sel.from) q.where('created_at', '>=', sel.from);
  if (sel.to) q.where('created_at', '<', nextDay(sel.to));
  return q.limit(200);
}

const nextDay = (date: string): string => new Date(Date.parse(`${date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

export interface DbRecordedTrip {
  id: number;
  wave_id: number;
  n: number;
  status: string;
  planned_metres: number;
  walked_metres: number | null;
}

export const tripsOfWaves = (db: Q, waveIds: number[]): Promise<DbRecordedTrip[]> =>
  db<DbRecordedTrip>('trips')
    .whereIn('wave_id', waveIds)
    .whereNot({ status: 'cancelled' })
    .orderBy(['wave_id', 'n'])
    .select('id', 'wave_id', 'n', 'status', 'planned_metres', 'walked_metres');

export interface DbRecordedStop {
  id: number;
  trip_id: number;
  n: number;
  bins: string;
  status: string;
  done_seq: number | null;
}

export const stopsOfTrips = (db: Q, tripIds: number[]): Promise<DbRecordedStop[]> =>
  db<DbRecordedStop>('stops').whereIn('trip_id', tripIds).orderBy(['trip_id', 'n', 'id']).select('id', 'trip_id', 'n', 'bins', 'status', 'done_seq');

export interface DbRecordedLine {
  trip_id: number;
  order_ref: string;
  sku: string;
  bin: string;
  qty: number;
}

export const linesOfTrips = (db: Q, tripIds: number[]): Promise<DbRecordedLine[]> =>
  db<DbRecordedLine>('pick_lines').whereIn('trip_id', tripIds).orderBy('id').select('trip_id', 'order_ref', 'sku', 'bin', 'qty');

export const skuUnits = (db: Q, siteId: number): Promise<{ sku: string; unit_weight_kg: number; unit_volume_l: number }[]> =>
  db('skus').where({ site_id: siteId }).select('sku', 'unit_weight_kg', 'unit_volume_l');

export interface DbOrderFacts {
  ref: string;
  due: string | null;
  priority: number | null;
  created_at: string;
  id: number;
}

/** Arrival (created_at, then id), due time and priority of orders by reference. */
export const orderFacts = (db: Q, siteId: number, refs: string[]): Promise<DbOrderFacts[]> =>
  db('orders').where({ site_id: siteId }).whereIn('ref', refs).select<DbOrderFacts[]>('ref', 'due', 'priority', 'created_at', 'id');

export const deleteStudyRow = (db: Q, siteId: number, id: number): Promise<number> => db('studies').where({ site_id: siteId, id }).del();

export interface DbStudyLayoutRow {
  id: number;
  site_id: number;
  name: string;
  filename: string;
  geometry: string;
  stats: string;
  created_by: number | null;
  created_at: string;
}

export async function insertStudyLayout(db: Q, row: Omit<DbStudyLayoutRow, 'id'>): Promise<number> {
  const [{ id }] = await db('study_layouts').insert(row, 'id');
  return id as number;
}

/** One candidate layout of the site with its geometry. */
export const getStudyLayoutRow = (db: Q, siteId: number, id: number): Promise<DbStudyLayoutRow | undefined> =>
  db<DbStudyLayoutRow>('study_layouts').where({ site_id: siteId, id }).first();

/** The site's candidate layouts, newest first, without their geometry. */
export const listStudyLayoutRows = (db: Q, siteId: number): Promise<(Omit<DbStudyLayoutRow, 'geometry'> & { creator: string | null })[]> =>
  db('study_layouts')
    .leftJoin('users', 'users.id', 'study_layouts.created_by')
    .where({ 'study_layouts.site_id': siteId })
    .orderBy('study_layouts.id', 'desc')
    .select(
      'study_layouts.id',
      'study_layouts.site_id',
      'study_layouts.name',
      'study_layouts.filename',
      'study_layouts.stats',
      'study_layouts.created_by',
      'study_layouts.created_at',
      'users.name as creator',
    );
