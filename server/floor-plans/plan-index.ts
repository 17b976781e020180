/**
 * A stored plan, loaded for routing: its site model (server/core/site) over the geometry, walk graph and
 * distance index deserialised from their BLOBs (no recomputation), with the bin and depot look-ups.
 * Waves and studies use this; it is cached in memory per plan id and closure version, so a closure or
 * reopening makes the next load read the new arrays.
 */
import type { Knex } from 'knex';
import type { FloorPlanClosure } from '../../shared/floor-plans';
import { deserializeDistanceIndex, deserializeWalkGraph } from '../core/plan/serialize';
import type { DistanceIndex } from '../core/plan/distances';
import type { PlanClosure, PlanGeometry } from '../core/plan/types';
import type { WalkGraph } from '../core/plan/walk-graph';
import { buildSiteModel, type SiteModel } from '../core/site/index';
import { AppError, notFound } from '../http/errors';
import { activePlanRow, getPlanRowById, listOpenClosures, loadGeometry, loadGraphSets, toEngineClosure } from './floor-plans.repository';

export interface LoadedPlan {
  planId: number;
  siteId: number;
  version: number;
  closureVersion: number;
  geometry: PlanGeometry;
  /** Open closures the graph and index were built with. */
  closures: PlanClosure[];
  closureRows: FloorPlanClosure[];
  graph: WalkGraph;
  index: DistanceIndex;
  /** The site model of the plan and its open closures, for its first depot. */
  site: SiteModel;
  /** Access-point node of a bin code; undefined when the code is not on the plan or the bin has no node. */
  binNode(code: string): number | undefined;
  /** Index into geometry.bins of a bin code. */
  binIndex(code: string): number | undefined;
  /** Node of each depot, in geometry.depots order. */
  depotNodes: Int32Array;
}

/** Plans kept in memory per database; a 50,000-bin plan is a few MB with its geometry. */
const CACHE_LIMIT = 8;
/**
 * Keyed by the database too: plan ids are only unique within one database, and one process can hold
 * several (tests, benchmarks) — a cache by id alone once served another database's plan 1.
 */
const caches = new WeakMap<Knex, Map<number, LoadedPlan>>();
const cacheOf = (db: Knex): Map<number, LoadedPlan> => {
  let c = caches.get(db);
  if (!c) {
    c = new Map();
    caches.set(db, c);
  }
  return c;
};

function remember(db: Knex, plan: LoadedPlan): void {
  const cache = cacheOf(db);
  cache.delete(plan.planId);
  cache.set(plan.planId, plan);
  while (cache.size > CACHE_LIMIT) cache.delete(cache.keys().next().value!);
}

/** Drops a plan (or every plan) of a database from the cache (after deletion; tests). */
export function forgetPlanIndex(db: Knex, planId?: number): void {
  if (planId === undefined) caches.delete(db);
  else cacheOf(db).delete(planId);
}

/**
 * Loads a stored plan (any state except one still being saved). Cached: a hit costs one small row read
 * to compare the closure version. Throws AppError not_found for an unknown plan.
 */
export async function loadPlanIndex(db: Knex, planId: number): Promise<LoadedPlan> {
  const row = await getPlanRowById(db, planId);
  if (!row) throw notFound('Floor plan');
  const hit = cacheOf(db).get(planId);
  if (hit && hit.closureVersion === row.closure_version) {
    remember(db, hit);
    return hit;
  }
  const sets = await loadGraphSets(db, planId);
  if (!sets) throw new AppError('internal', 'plan_not_built', `Floor plan ${planId} has no stored walk graph`);
  const [geometry, closureRows] = await Promise.all([loadGeometry(db, planId), listOpenClosures(db, planId)]);
  const graph = deserializeWalkGraph(sets.graph);
  const index = deserializeDistanceIndex(sets.index);
  const closures = closureRows.map(toEngineClosure);
  const site = buildSiteModel({ geometry, closures, graph, index });
  const loaded: LoadedPlan = {
    planId,
    siteId: row.site_id,
    version: row.version ?? 0,
    closureVersion: sets.closureVersion,
    geometry,
    closures,
    closureRows,
    graph,
    index,
    site,
    binIndex: site.binIndex,
    binNode: site.binNode,
    depotNodes: site.depotNodes,
  };
  remember(db, loaded);
  return loaded;
}

/** Id of the site's active plan, or null when it has none. */
export async function activePlanId(db: Knex, siteId: number): Promise<number | null> {
  const row = await activePlanRow(db, siteId);
  return row?.id ?? null;
}
