/** Floor-plan tables: one database operation per function, each taking `db` or a transaction. */
import type { Knex } from 'knex';
import type { Q } from '../db/knex';
import type BetterSqlite3 from 'better-sqlite3';
import { isPg } from '../db/dialect';
import type { FloorPlanClosure, FloorPlanState, FloorPlanStats, FloorPlanSummary, GeneratePlanParams } from '../../shared/floor-plans';
import type { RowIssue } from '../../shared/imports';
import type { PlanClosure, PlanGeometry } from '../core/plan/types';
import type { SerializedSet } from './build';

export type DbPlanState = FloorPlanState | 'building';

export interface DbFloorPlanRow {
  id: number;
  site_id: number;
  version: number | null;
  name: string;
  state: DbPlanState;
  source: 'upload' | 'generated';
  source_filename: string | null;
  generator_params: string | null;
  uploaded_by: number | null;
  created_at: string;
  activated_at: string | null;
  retired_at: string | null;
  bins: number;
  aisles: number;
  cross_aisles: number;
  access_points: number;
  depots: number;
  total_aisle_length_m: number;
  node_count: number;
  hub_count: number;
  stored_bytes: number;
  build_ms: number;
  closure_version: number;
  warnings: string;
}

interface DbClosureRow {
  id: number;
  plan_id: number;
  kind: 'aisle' | 'cross_aisle';
  code: string;
  from_m: number;
  to_m: number;
  reason: string | null;
  created_by: number | null;
  created_at: string;
  reopened_by: number | null;
  reopened_at: string | null;
}

/** Rows per saving chunk: a few milliseconds of the event loop each (measured in tests/bench/floor-plan-upload.bench.ts). */
export const INSERT_CHUNK = 2500;

export function statsOf(r: DbFloorPlanRow): FloorPlanStats {
  return {
    bins: r.bins,
    aisles: r.aisles,
    crossAisles: r.cross_aisles,
    accessPoints: r.access_points,
    depots: r.depots,
    totalAisleLengthM: r.total_aisle_length_m,
  };
}

export interface SummaryExtras {
  uploaderName: string | null;
  openClosures: number;
  inUse: boolean;
}

export function toSummary(r: DbFloorPlanRow, x: SummaryExtras): FloorPlanSummary {
  return {
    id: r.id,
    siteId: r.site_id,
    version: r.version ?? 0,
    name: r.name,
    state: r.state === 'building' ? 'draft' : r.state,
    source: r.source,
    sourceFilename: r.source_filename,
    generatorParams: r.generator_params ? (JSON.parse(r.generator_params) as GeneratePlanParams) : null,
    uploadedBy: r.uploaded_by !== null && x.uploaderName !== null ? { id: r.uploaded_by, name: x.uploaderName } : null,
    createdAt: r.created_at,
    activatedAt: r.activated_at,
    retiredAt: r.retired_at,
    stats: statsOf(r),
    storedBytes: r.stored_bytes,
    buildMs: Math.round(r.build_ms),
    closureVersion: r.closure_version,
    openClosures: x.openClosures,
    readOnly: r.state === 'retired' || x.inUse,
  };
}

export async function getPlanRow(db: Q, siteId: number, planId: number): Promise<DbFloorPlanRow | undefined> {
  return db<DbFloorPlanRow>('floor_plans').where({ id: planId, site_id: siteId }).whereNot({ state: 'building' }).first();
}

export async function getPlanRowById(db: Q, planId: number): Promise<DbFloorPlanRow | undefined> {
  return db<DbFloorPlanRow>('floor_plans').where({ id: planId }).whereNot({ state: 'building' }).first();
}

/** Listed plans of a site, newest version first, with the uploader's name and open closures. */
export async function listPlanRows(db: Q, siteId: number): Promise<(DbFloorPlanRow & { uploader_name: string | null; open_closures: number })[]> {
  return db('floor_plans as p')
    .leftJoin('users as u', 'u.id', 'p.uploaded_by')
    .where('p.site_id', siteId)
    .whereNot('p.state', 'building')
    .orderBy('p.version', 'desc')
    .select('p.*', 'u.name as uploader_name')
    .select(db.raw('(select count(*) from floor_plan_closures c where c.plan_id = p.id and c.reopened_at is null) as open_closures'));
}

export async function userName(db: Q, userId: number | null): Promise<string | null> {
  if (userId === null) return null;
  const u = await db('users').where({ id: userId }).first<{ name: string } | undefined>('name');
  return u?.name ?? null;
}

export async function activePlanRow(db: Q, siteId: number): Promise<DbFloorPlanRow | undefined> {
  return db<DbFloorPlanRow>('floor_plans').where({ site_id: siteId, state: 'active' }).first();
}

/** Of `bins`, those not on the site's active floor plan (every one of them when no plan is active). */
export async function missingBinsOnActivePlan(db: Q, siteId: number, bins: string[]): Promise<Set<string>> {
  const wanted = [...new Set(bins)];
  const plan = await db('floor_plans').where({ site_id: siteId, state: 'active' }).first<{ id: number } | undefined>('id');
  if (!plan) return new Set(wanted);
  const found = new Set<string>();
  for (let i = 0; i < wanted.length; i += 500) {
    const rows: { code: string }[] = await db('floor_plan_bins')
      .where({ plan_id: plan.id })
      .whereIn('code', wanted.slice(i, i + 500))
      .select('code');
    for (const r of rows) found.add(r.code);
  }
  return new Set(wanted.filter((b) => !found.has(b)));
}

export interface NewPlanRow {
  site_id: number;
  name: string;
  source: 'upload' | 'generated';
  source_filename: string | null;
  generator_params: string | null;
  uploaded_by: number | null;
  stats: FloorPlanStats;
  node_count: number;
  hub_count: number;
  stored_bytes: number;
  build_ms: number;
  warnings: RowIssue[];
}

/** A plan row in state 'building': invisible until `finishPlan` numbers it as a draft. */
export async function insertBuildingPlan(db: Q, p: NewPlanRow, now: string): Promise<number> {
  const [{ id }] = await db('floor_plans').insert(
    {
      site_id: p.site_id,
      version: null,
      name: p.name,
      state: 'building',
      source: p.source,
      source_filename: p.source_filename,
      generator_params: p.generator_params,
      uploaded_by: p.uploaded_by,
      created_at: now,
      bins: p.stats.bins,
      aisles: p.stats.aisles,
      cross_aisles: p.stats.crossAisles,
      access_points: p.stats.accessPoints,
      depots: p.stats.depots,
      total_aisle_length_m: p.stats.totalAisleLengthM,
      node_count: p.node_count,
      hub_count: p.hub_count,
      stored_bytes: p.stored_bytes,
      build_ms: p.build_ms,
      warnings: JSON.stringify(p.warnings),
    },
    'id',
  );
  return id!;
}

/**
 * Deletes plans left in state 'building' by a server that stopped mid-save. Only call where no save
 * can be running (saves run one at a time, behind the job queue).
 */
export async function purgeUnfinishedPlans(db: Q): Promise<number> {
  return db('floor_plans').where({ state: 'building' }).delete();
}

/** Next version number of a site: one past the highest ever given (deleted drafts leave gaps). */
export async function nextVersion(db: Q, siteId: number): Promise<number> {
  const r = await db('floor_plans').where({ site_id: siteId }).max<{ v: number | null }>({ v: 'version' }).first();
  return (r?.v ?? 0) + 1;
}

export async function setPlanDraft(db: Q, planId: number, version: number): Promise<void> {
  await db('floor_plans').where({ id: planId, state: 'building' }).update({ state: 'draft', version });
}

export async function deletePlan(db: Q, planId: number): Promise<void> {
  await db('floor_plans').where({ id: planId }).delete();
}

export async function retireActive(db: Q, siteId: number, now: string): Promise<number[]> {
  const rows = await db('floor_plans').where({ site_id: siteId, state: 'active' }).select<{ id: number }[]>('id');
  if (rows.length)
    await db('floor_plans')
      .whereIn(
        'id',
        rows.map((r) => r.id),
      )
      .update({ state: 'retired', retired_at: now });
  return rows.map((r) => r.id);
}

export async function setActive(db: Q, planId: number, now: string): Promise<void> {
  await db('floor_plans').where({ id: planId }).update({ state: 'active', activated_at: now, retired_at: null });
}

export async function renamePlan(db: Q, planId: number, name: string): Promise<void> {
  await db('floor_plans').where({ id: planId }).update({ name });
}

/** Geometry row chunks of at most INSERT_CHUNK rows each, in the order to insert them. */
export function geometryInsertChunks(planId: number, plan: PlanGeometry): { table: string; rows: Record<string, unknown>[] }[] {
  const out: { table: string; rows: Record<string, unknown>[] }[] = [];
  const push = <T>(table: string, items: T[], row: (item: T, i: number) => Record<string, unknown>) => {
    for (let s = 0; s < items.length; s += INSERT_CHUNK) {
      out.push({ table, rows: items.slice(s, s + INSERT_CHUNK).map((it, k) => row(it, s + k)) });
    }
  };
  push('floor_plan_aisles', plan.aisles, (a, i) => ({ plan_id: planId, idx: i, code: a.code, x_m: a.x, y_start_m: a.yStart, y_end_m: a.yEnd }));
  push('floor_plan_cross_aisles', plan.crossAisles, (c, i) => ({ plan_id: planId, idx: i, code: c.code, y_m: c.y, x_start_m: c.xStart, x_end_m: c.xEnd }));
  push('floor_plan_depots', plan.depots, (d, i) => ({ plan_id: planId, idx: i, code: d.code, x_m: d.x, y_m: d.y }));
  push('floor_plan_bins', plan.bins, (b, i) => ({
    plan_id: planId,
    idx: i,
    code: b.code,
    aisle: b.aisle,
    y_m: b.y,
    bay: b.bay,
    side: b.side,
    level: b.level,
    zone: b.zone,
  }));
  return out;
}

/**
 * Inserts rows through one prepared statement inside one SQLite transaction. Knex would send a
 * multi-row INSERT as a compound SELECT, which SQLite caps at 500 terms and which costs far more to
 * build; this holds the single pooled connection only for the one chunk. PostgreSQL takes the chunk as
 * multi-row INSERTs (its bound is 65,535 parameters, so 1,000 rows of ≤ 10 columns each).
 */
export async function insertRows(db: Knex, table: string, rows: Record<string, unknown>[]): Promise<void> {
  if (!rows.length) return;
  if (isPg(db)) {
    await db.batchInsert(table, rows, 1000);
    return;
  }
  const columns = Object.keys(rows[0]!);
  const conn = (await db.client.acquireConnection()) as BetterSqlite3.Database;
  try {
    const stmt = conn.prepare(`INSERT INTO "${table}" (${columns.map((c) => `"${c}"`).join(', ')}) VALUES (${columns.map((c) => `@${c}`).join(', ')})`);
    conn.transaction((batch: Record<string, unknown>[]) => {
      for (const r of batch) stmt.run(r);
    })(rows);
  } finally {
    await db.client.releaseConnection(conn);
  }
}

/** Replaces the stored walk graph and distance index of a plan. */
export async function replaceGraph(db: Q, planId: number, closureVersion: number, graph: SerializedSet, index: SerializedSet): Promise<void> {
  await db('floor_plan_arrays').where({ plan_id: planId }).delete();
  await db('floor_plan_graphs').where({ plan_id: planId }).delete();
  await db('floor_plan_graphs').insert({ plan_id: planId, closure_version: closureVersion, graph_header: graph.json, index_header: index.json });
  const rows: Record<string, unknown>[] = [];
  for (const [set, data] of [
    ['graph', graph],
    ['index', index],
  ] as const) {
    for (const [name, bytes] of Object.entries(data.blobs)) {
      rows.push({ plan_id: planId, set_name: set, array_name: name, data: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) });
    }
  }
  for (const r of rows) await db('floor_plan_arrays').insert(r);
}

export async function loadGraphSets(db: Q, planId: number): Promise<{ closureVersion: number; graph: SerializedSet; index: SerializedSet } | null> {
  const head = await db('floor_plan_graphs')
    .where({ plan_id: planId })
    .first<{ closure_version: number; graph_header: string; index_header: string } | undefined>();
  if (!head) return null;
  const rows = await db('floor_plan_arrays')
    .where({ plan_id: planId })
    .select<{ set_name: string; array_name: string; data: Buffer }[]>('set_name', 'array_name', 'data');
  const graph: SerializedSet = { json: head.graph_header, blobs: {} };
  const index: SerializedSet = { json: head.index_header, blobs: {} };
  for (const r of rows) (r.set_name === 'graph' ? graph : index).blobs[r.array_name] = r.data;
  return { closureVersion: head.closure_version, graph, index };
}

export async function loadGeometry(db: Q, planId: number): Promise<PlanGeometry> {
  const [aisles, crossAisles, depots, bins] = await Promise.all([
    db('floor_plan_aisles')
      .where({ plan_id: planId })
      .orderBy('idx')
      .select<{ code: string; x_m: number; y_start_m: number; y_end_m: number }[]>('code', 'x_m', 'y_start_m', 'y_end_m'),
    db('floor_plan_cross_aisles')
      .where({ plan_id: planId })
      .orderBy('idx')
      .select<{ code: string; y_m: number; x_start_m: number; x_end_m: number }[]>('code', 'y_m', 'x_start_m', 'x_end_m'),
    db('floor_plan_depots').where({ plan_id: planId }).orderBy('idx').select<{ code: string; x_m: number; y_m: number }[]>('code', 'x_m', 'y_m'),
    db('floor_plan_bins')
      .where({ plan_id: planId })
      .orderBy('idx')
      .select<{ code: string; aisle: string; y_m: number; bay: number | null; side: 'L' | 'R'; level: number; zone: string | null }[]>(
        'code',
        'aisle',
        'y_m',
        'bay',
        'side',
        'level',
        'zone',
      ),
  ]);
  return {
    aisles: aisles.map((a) => ({ code: a.code, x: a.x_m, yStart: a.y_start_m, yEnd: a.y_end_m })),
    crossAisles: crossAisles.map((c) => ({ code: c.code, y: c.y_m, xStart: c.x_start_m, xEnd: c.x_end_m })),
    depots: depots.map((d) => ({ code: d.code, x: d.x_m, y: d.y_m })),
    bins: bins.map((b) => ({ code: b.code, aisle: b.aisle, y: b.y_m, bay: b.bay, side: b.side, level: b.level, zone: b.zone })),
  };
}

export async function listOpenClosures(db: Q, planId: number): Promise<FloorPlanClosure[]> {
  const rows: (DbClosureRow & { creator_name: string | null })[] = await db('floor_plan_closures as c')
    .leftJoin('users as u', 'u.id', 'c.created_by')
    .where('c.plan_id', planId)
    .whereNull('c.reopened_at')
    .orderBy('c.id')
    .select('c.*', 'u.name as creator_name');
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind,
    code: r.code,
    fromM: r.from_m,
    toM: r.to_m,
    reason: r.reason,
    createdBy: r.created_by !== null && r.creator_name !== null ? { id: r.created_by, name: r.creator_name } : null,
    createdAt: r.created_at,
  }));
}

export const toEngineClosure = (c: FloorPlanClosure): PlanClosure => ({ kind: c.kind, code: c.code, from: c.fromM, to: c.toM });

export async function insertClosure(
  db: Q,
  c: { planId: number; kind: 'aisle' | 'cross_aisle'; code: string; fromM: number; toM: number; reason: string | null; userId: number },
  now: string,
): Promise<number> {
  const [{ id }] = await db('floor_plan_closures').insert(
    {
      plan_id: c.planId,
      kind: c.kind,
      code: c.code,
      from_m: c.fromM,
      to_m: c.toM,
      reason: c.reason,
      created_by: c.userId,
      created_at: now,
    },
    'id',
  );
  return id!;
}

/** Widens an open closure to a new range (an overlapping stretch closed again is merged into it). */
export async function setClosureRange(db: Q, planId: number, closureId: number, fromM: number, toM: number): Promise<void> {
  await db('floor_plan_closures').where({ id: closureId, plan_id: planId }).whereNull('reopened_at').update({ from_m: fromM, to_m: toM });
}

export async function reopenClosure(db: Q, planId: number, closureId: number, userId: number, now: string): Promise<boolean> {
  const n = await db('floor_plan_closures')
    .where({ id: closureId, plan_id: planId })
    .whereNull('reopened_at')
    .update({ reopened_at: now, reopened_by: userId });
  return n > 0;
}

export async function setClosureVersion(db: Q, planId: number, closureVersion: number): Promise<void> {
  await db('floor_plans').where({ id: planId }).update({ closure_version: closureVersion });
}

export async function countPlanRows(db: Q, siteId?: number): Promise<number> {
  const q = db('floor_plans');
  if (siteId !== undefined) q.where({ site_id: siteId });
  const r = await q.count<{ n: number }[]>({ n: '*' });
  return Number(r[0]!.n);
}

/** True when a wave was planned on this plan (waves keep the plan they were planned on). */
export async function isPlanInUse(db: Q, planId: number): Promise<boolean> {
  const r = await db('waves').where({ plan_id: planId }).first('id');
  return r !== undefined;
}

/** The subset of `planIds` that waves were planned on. */
export async function plansInUse(db: Q, planIds: number[]): Promise<Set<number>> {
  if (!planIds.length) return new Set();
  const rows = await db('waves').whereIn('plan_id', planIds).distinct<{ plan_id: number }[]>('plan_id');
  return new Set(rows.map((r) => r.plan_id));
}
