/**
 * Studies: gather the work (recorded waves, or a plan and generated orders), run it in a worker with
 * progress and cancel, save inputs and results, and answer the screens (plans, routes, workbook).
 */
import type { Knex } from 'knex';
import type { Deps } from '../deps';
import { nowIso } from '../db/knex';
import { generateRectangularPlan } from '../core/plan/generate';
import { loadPlanIndex, activePlanId } from '../floor-plans/plan-index';
import { getPlanRowById } from '../floor-plans/floor-plans.repository';
import { engineParams } from '../floor-plans/floor-plans.service';
import { AppError, notFound } from '../http/errors';
import { getCartProfile, getSiteRow, settingsOf } from '../sites/sites.repository';
import { binsOf } from '../picking/picking.repository';
import { jobStopMessage, runInWorker } from '../workers/spawn';
import { isActive, type JobContext, type JobKind, type JobRecord } from '../workers/jobs';
import type { PlannerOrder } from '../waves/wave-planner';
import { audit } from '../audit/audit';
import { checkFloorPlanFile } from '../floor-plans/import';
import {
  ROUTING_LABELS,
  StudyInputs,
  type CandidateLayout,
  type CandidateLayoutUpload,
  type RoutingMethodKey,
  type StudyDetail,
  type StudyInputsBody,
  type StudyResults,
  type StudyRoute,
  type StudySummary,
} from '../../shared/studies';
import type { PlanGeometry } from '../core/plan/types';
import {
  applyChanges,
  buildPlan,
  StudyInputError,
  tripRoute,
  type BuiltPlan,
  type RecordedTrip,
  type StudyEngineInput,
  type StudyPlanInput,
  type StudyWave,
  type StudyWhatIf,
} from './study-engine';
import { generateStudyOrders } from './generate-orders';
import type { StudyProgress } from './study.worker';
import {
  deleteStudyRow,
  getStudyLayoutRow,
  getStudyRow,
  insertStudy,
  insertStudyLayout,
  listStudyLayoutRows,
  linesOfTrips,
  listStudyRows,
  orderFacts,
  recordedWaves,
  setStudyStatus,
  skuUnits,
  stopsOfTrips,
  toDetail,
  toSummary,
  tripsOfWaves,
  type DbStudyLayoutRow,
} from './studies.repository';

/** A queued or running row without a live job this long after it was saved was cut off. */
const ORPHAN_AFTER_MS = 30_000;
/** Cart used when the site has no cart profile: 8 totes, 150 kg, 400 L (invented, typical of a picking cart). */
const FALLBACK_CART = { totes: 8, maxKg: 150, maxLitres: 400 };
/** A study's process is stopped after this long; the engine's own budgets are step counts, not time. */
const STUDY_TIMEOUT_MS = 15 * 60_000;
/** Heap cap of a study's process (MiB): the largest plans' distance index plus every variant's routes. */
const STUDY_HEAP_MB = 1536;

type Work = Omit<StudyEngineInput, 'progress'>;

async function storedPlanInput(db: Knex, siteId: number, planId: number, depotIdx: number): Promise<StudyPlanInput> {
  const row = await getPlanRowById(db, planId);
  if (!row || row.site_id !== siteId)
    throw new AppError('validation', 'validation_failed', 'Unknown floor plan', [{ field: 'work.plan.planId', message: 'no such plan on this site' }]);
  const plan = await loadPlanIndex(db, planId);
  if (depotIdx >= plan.geometry.depots.length)
    throw new AppError('validation', 'validation_failed', 'The plan has no such depot', [{ field: 'depot', message: 'no such depot' }]);
  return { geometry: plan.geometry, closures: plan.closures, depotIdx };
}

/** The base plan of a study: a stored plan with its open closures, or one generated from parameters. */
async function basePlanOf(db: Knex, siteId: number, inputs: StudyInputs, recordedPlanId: number | null, depotIdx: number): Promise<StudyPlanInput> {
  if (inputs.work.kind === 'recorded') return storedPlanInput(db, siteId, recordedPlanId!, depotIdx);
  const src = inputs.work.plan;
  if (src.source === 'generated') {
    try {
      return { geometry: generateRectangularPlan(engineParams(src.params)), closures: [], depotIdx: 0 };
    } catch (e) {
      throw new AppError('validation', 'validation_failed', (e as Error).message, [{ field: 'work.plan.params', message: (e as Error).message }]);
    }
  }
  if (src.source === 'active') throw new AppError('internal', 'unresolved_plan', 'The active plan should have been resolved to its id');
  return storedPlanInput(db, siteId, src.planId, 0);
}

/** Recorded waves as engine work: their orders (from the pick lines) and their trips as released. */
async function recordedWork(db: Knex, siteId: number, inputs: StudyInputs): Promise<{ waves: StudyWave[]; planId: number; depotIdx: number; days: number }> {
  if (inputs.work.kind !== 'recorded') throw new Error('not a recorded study');
  const sel = inputs.work;
  if (!sel.waveIds?.length && !sel.from && !sel.to) {
    throw new AppError('validation', 'validation_failed', 'Choose waves by hand or a date range', [
      { field: 'work.waveIds', message: 'choose waves or dates' },
    ]);
  }
  const rows = await recordedWaves(db, siteId, sel);
  if (rows.length === 0)
    throw new AppError('validation', 'no_waves', 'No released waves match; choose other waves or dates', [{ field: 'work', message: 'no waves' }]);
  const plans = new Set(rows.map((w) => w.plan_id));
  if (plans.size > 1) {
    throw new AppError('validation', 'mixed_plans', `These waves were planned on ${plans.size} different floor plans; a study compares waves of one plan`, [
      { field: 'work', message: 'waves of several plans' },
    ]);
  }
  const trips = await tripsOfWaves(
    db,
    rows.map((w) => w.id),
  );
  const tripIds = trips.map((t) => t.id);
  const [stops, lines, units] = await Promise.all([stopsOfTrips(db, tripIds), linesOfTrips(db, tripIds), skuUnits(db, siteId)]);
  const unitOf = new Map(units.map((u) => [u.sku, u]));
  const facts = new Map((await orderFacts(db, siteId, [...new Set(lines.map((l) => l.order_ref))])).map((f) => [f.ref, f]));
  const waves: StudyWave[] = rows.map((w) => {
    const mine = trips.filter((t) => t.wave_id === w.id);
    const byOrder = new Map<string, PlannerOrder>();
    const recorded: RecordedTrip[] = mine.map((t) => {
      const ls = lines.filter((l) => l.trip_id === t.id);
      for (const l of ls) {
        const o = byOrder.get(l.order_ref) ?? { ref: l.order_ref, due: null, priority: null, lines: [] };
        const u = unitOf.get(l.sku);
        o.lines.push({ sku: l.sku, qty: l.qty, bin: l.bin, unitKg: u?.unit_weight_kg ?? 0, unitLitres: u?.unit_volume_l ?? 0 });
        byOrder.set(l.order_ref, o);
      }
      const ss = stops.filter((s) => s.trip_id === t.id);
      const confirmed = ss.filter((s) => s.status === 'done').sort((a, b) => (a.done_seq ?? a.n) - (b.done_seq ?? b.n) || a.id - b.id);
      return {
        orders: [...new Set(ls.map((l) => l.order_ref))],
        stopBins: ss.map((s) => binsOf(s.bins)),
        lines: ls.length,
        plannedMetres: t.planned_metres,
        walkedMetres: t.walked_metres,
        confirmedBins: confirmed.map((s) => binsOf(s.bins)),
      };
    });
    // Batching is compared on the orders as they arrived, with their due time and priority, not in the
    // order the released trips carried them (that order would let FCFS replay the released wave).
    const arrival = (ref: string): [string, number] => [facts.get(ref)?.created_at ?? '', facts.get(ref)?.id ?? Number.MAX_SAFE_INTEGER];
    const orders = [...byOrder.values()]
      .map((o) => ({ ...o, due: facts.get(o.ref)?.due ?? null, priority: facts.get(o.ref)?.priority ?? null }))
      .sort((a, b) => {
        const [ca, ia] = arrival(a.ref);
        const [cb, ib] = arrival(b.ref);
        return ca < cb ? -1 : ca > cb ? 1 : ia - ib || (a.ref < b.ref ? -1 : 1);
      });
    return { id: w.id, name: w.name, orders, cart: { totes: w.cart_totes, maxKg: w.cart_max_kg, maxLitres: w.cart_max_litres }, recorded };
  });
  const days = new Set(rows.map((w) => w.created_at.slice(0, 10))).size;
  return { waves, planId: rows[0]!.plan_id, depotIdx: rows[0]!.depot_idx, days };
}

/** The sizes of a cart profile (a removed one is unknown), or the fallback cart when none is chosen. */
async function cartOf(db: Knex, siteId: number, cartProfileId: number | undefined): Promise<{ totes: number; maxKg: number; maxLitres: number }> {
  if (cartProfileId === undefined) return FALLBACK_CART;
  const c = await getCartProfile(db, siteId, cartProfileId);
  if (!c) throw new AppError('validation', 'validation_failed', 'Unknown cart profile', [{ field: 'work.cartProfileId', message: 'unknown cart profile' }]);
  return { totes: c.totes, maxKg: c.maxKg, maxLitres: c.maxLitres };
}

/**
 * A candidate layout as a what-if plan: its own geometry, no closures, the depot of the base plan's
 * code (else its first). Refused when it shares no bin code with the base plan: no order of the
 * study could be placed on it, so it would compare nothing.
 */
async function candidatePlan(db: Knex, siteId: number, layoutId: number, base: StudyPlanInput, i: number): Promise<StudyPlanInput> {
  const row = await getStudyLayoutRow(db, siteId, layoutId);
  if (!row)
    throw new AppError('validation', 'validation_failed', 'Unknown candidate layout; upload it again', [
      { field: `whatIfs.${i}.layoutId`, message: 'no such candidate layout on this site' },
    ]);
  const geometry = JSON.parse(row.geometry) as PlanGeometry;
  const baseBins = new Set(base.geometry.bins.map((b) => b.code));
  if (!geometry.bins.some((b) => baseBins.has(b.code))) {
    const message = `the candidate layout "${row.name}" has none of the plan's bin codes, so no order could be placed on it; keep the site's bin codes in the candidate workbook`;
    throw new AppError('validation', 'validation_failed', message, [{ field: `whatIfs.${i}.layoutId`, message }]);
  }
  const code = base.geometry.depots[base.depotIdx]?.code;
  return {
    geometry,
    closures: [],
    depotIdx: Math.max(
      0,
      geometry.depots.findIndex((d) => d.code === code),
    ),
  };
}

/** Everything the worker needs, read from the database and generated from the seed. */
async function prepareWork(db: Knex, siteId: number, inputs: StudyInputs): Promise<Work> {
  const site = (await getSiteRow(db, siteId))!;
  const speeds = settingsOf(site);
  let waves: StudyWave[];
  let base: StudyPlanInput;
  let dayScale: number;
  let replicas: { seed: number; waves: StudyWave[] }[] = [];
  if (inputs.work.kind === 'recorded') {
    const r = await recordedWork(db, siteId, inputs);
    waves = r.waves;
    base = await basePlanOf(db, siteId, inputs, r.planId, r.depotIdx);
    dayScale = 1 / r.days;
  } else {
    const w = inputs.work;
    base = await basePlanOf(db, siteId, inputs, null, 0);
    const cart = w.cart ?? (await cartOf(db, siteId, w.cartProfileId));
    const draw = (seed: number): StudyWave[] =>
      generateStudyOrders(base.geometry.bins, w.orders, seed).map((orders, i) => ({ id: i + 1, name: `Generated wave ${i + 1}`, orders, cart }));
    waves = draw(inputs.seed);
    // Replication r (from 0) draws with seed + r, wrapping within the seed's range.
    replicas = Array.from({ length: inputs.replications - 1 }, (_, r) => {
      const seed = (inputs.seed + r + 1) % 2 ** 31;
      return { seed, waves: draw(seed) };
    });
    dayScale = w.wavesPerDay / w.orders.waves;
  }
  const whatIfs: StudyWhatIf[] = [];
  for (const [i, wi] of inputs.whatIfs.entries()) {
    const layout = wi.layoutId === undefined ? undefined : await candidatePlan(db, siteId, wi.layoutId, base, i);
    try {
      applyChanges(layout ?? base, wi.changes);
    } catch (e) {
      if (!(e instanceof StudyInputError)) throw e;
      const field = `whatIfs.${i}${e.field ? `.${e.field}` : ''}`;
      throw new AppError('validation', 'validation_failed', `What-if "${wi.label}": ${e.message}`, [{ field, message: e.message }]);
    }
    whatIfs.push(layout ? { ...wi, layout } : wi);
  }
  return {
    base,
    whatIfs,
    waves,
    tripsFrom: inputs.work.kind === 'recorded' ? 'recorded' : inputs.work.batching,
    routing: inputs.routing,
    batching: inputs.batching,
    speeds,
    dayScale,
    seed: inputs.seed,
    replicas,
  };
}

export const STUDY_JOB = 'study';
/** The job key of a study: its newest job tells its live progress. */
const studyKey = (id: number) => `study:${id}`;

/** What a study's job is given (JSON): the study to run; its inputs are read from its row. */
interface StudyJobData {
  siteId: number;
  studyId: number;
}

/** Progress of a queued or running study's job, for the summaries (none when it has no live job). */
type Live = { progress: number; phase: string | null } | undefined;
const liveOf = (r: JobRecord | null): Live => (r && isActive(r) ? { progress: r.progress, phase: r.phase } : undefined);
const studyJobOf = (deps: Deps, id: number) => deps.jobs.latest(studyKey(id));

/**
 * The job body of a study, on whichever instance takes it: reads its inputs, prepares the work, runs
 * it in its own process (whatever goes wrong in it fails this study only) and saves the results.
 */
async function runStudy(deps: Deps, { siteId, studyId: id }: StudyJobData, job: JobContext): Promise<null> {
  const row = await getStudyRow(deps.db, siteId, id);
  if (!row || (row.status !== 'queued' && row.status !== 'running')) return null;
  await setStudyStatus(deps.db, id, { status: 'running' });
  job.progress(0, 'starting');
  try {
    const work = await prepareWork(deps.db, siteId, StudyInputs.parse(JSON.parse(row.inputs)));
    const results = await runInWorker<StudyResults, StudyProgress>(new URL('./study.worker.ts', import.meta.url), work, {
      timeoutMs: STUDY_TIMEOUT_MS,
      heapMb: STUDY_HEAP_MB,
      signal: job.signal,
      onProgress: (p) => job.progress(p.fraction, p.phase),
    });
    if (job.signal.aborted) return null;
    await setStudyStatus(deps.db, id, { status: 'done', results: JSON.stringify(results), finished_at: nowIso() });
  } catch (err) {
    if (job.signal.aborted) throw err;
    deps.logger.warn({ err, study: id }, 'study failed');
    await setStudyStatus(deps.db, id, { status: 'failed', error: studyFailure(err), finished_at: nowIso() });
    throw err;
  }
  return null;
}

const studyFailure = (err: unknown) => jobStopMessage('The study', err) ?? (err as Error).message;

/** Studies as a job kind; one runs at a time per instance (two cores serve every request too). */
export function studyJob(deps: Deps): JobKind<StudyJobData, null> {
  return { name: STUDY_JOB, run: (data, job) => runStudy(deps, data, job), describeFailure: studyFailure, expireInSeconds: STUDY_TIMEOUT_MS / 1000 + 5 * 60 };
}

/**
 * Saves a study and starts it. The active plan is resolved to its id first, so a rerun uses the same
 * plan after another one is activated. Validation and work preparation happen before anything is saved.
 */
export async function createStudy(deps: Deps, siteId: number, userId: number, body: StudyInputsBody, rerunOf: number | null = null): Promise<StudySummary> {
  const inputs = StudyInputs.parse(body);
  if (inputs.work.kind === 'generated' && inputs.work.plan.source === 'active') {
    const planId = await activePlanId(deps.db, siteId);
    if (!planId) throw new AppError('conflict', 'no_active_plan', 'This site has no active floor plan; choose a draft or generate one');
    inputs.work.plan = { source: 'plan', planId };
  }
  // The cart's sizes are kept with the study: the profile may change or go before a rerun.
  if (inputs.work.kind === 'generated' && !inputs.work.cart) inputs.work.cart = await cartOf(deps.db, siteId, inputs.work.cartProfileId);
  // Prepared here to answer a bad request at once; the job prepares it again wherever it runs.
  await prepareWork(deps.db, siteId, inputs);
  const id = await insertStudy(deps.db, {
    site_id: siteId,
    name: inputs.name,
    kind: inputs.work.kind,
    seed: inputs.seed,
    inputs: JSON.stringify(inputs),
    status: 'queued',
    rerun_of: rerunOf,
    created_by: userId,
    created_at: nowIso(),
  });
  await deps.jobs.submit(STUDY_JOB, { siteId, studyId: id } satisfies StudyJobData, { siteId, key: studyKey(id) });
  return (await getStudySummary(deps, siteId, id))!;
}

async function getStudySummary(deps: Deps, siteId: number, id: number): Promise<StudySummary | null> {
  const row = await getStudyRow(deps.db, siteId, id);
  return row ? toSummary(row, liveOf(await studyJobOf(deps, id))) : null;
}

/**
 * A row still queued or running whose job has ended or is unknown was cut off (by a restart of the one
 * SQLite process; on PostgreSQL a dead instance's job is taken over by another and stays live).
 */
async function settleOrphan<T extends { id: number; site_id: number; status: string; created_at: string }>(
  deps: Deps,
  row: T,
  job: JobRecord | null,
): Promise<T> {
  // A row just saved may not have its job yet (the submit is a moment after the insert).
  if ((row.status === 'queued' || row.status === 'running') && !isActive(job) && Date.now() - Date.parse(row.created_at) > ORPHAN_AFTER_MS) {
    // The job may have ended a moment ago and be writing the row: read it again first.
    const again = await getStudyRow(deps.db, row.site_id, row.id);
    if (again && again.status !== 'queued' && again.status !== 'running') return { ...row, ...again };
    const error = 'The server restarted while this study ran; rerun it';
    await setStudyStatus(deps.db, row.id, { status: 'failed', error, finished_at: nowIso() });
    return { ...row, status: 'failed', error };
  }
  return row;
}

export async function listStudies(deps: Deps, siteId: number, withArchived = false): Promise<StudySummary[]> {
  const rows = await listStudyRows(deps.db, siteId, withArchived);
  return Promise.all(
    rows.map(async (r) => {
      const job = r.status === 'queued' || r.status === 'running' ? await studyJobOf(deps, r.id) : null;
      return toSummary(await settleOrphan(deps, r, job), liveOf(job));
    }),
  );
}

export async function getStudy(deps: Deps, siteId: number, id: number): Promise<StudyDetail> {
  const row = await getStudyRow(deps.db, siteId, id);
  if (!row) throw notFound('Study');
  const job = row.status === 'queued' || row.status === 'running' ? await studyJobOf(deps, id) : null;
  return toDetail(await settleOrphan(deps, row, job), liveOf(job));
}

/** Stops a queued or running study (its process is killed); a finished one is left as it is. */
export async function cancelStudy(deps: Deps, siteId: number, id: number): Promise<StudySummary> {
  const row = await getStudyRow(deps.db, siteId, id);
  if (!row) throw notFound('Study');
  const job = await studyJobOf(deps, id);
  if (!isActive(job)) throw new AppError('conflict', 'not_running', `This study is ${row.status}; only a queued or running study can be cancelled`);
  await deps.jobs.cancel(job!.id);
  await setStudyStatus(deps.db, id, { status: 'cancelled', finished_at: nowIso() });
  return (await getStudySummary(deps, siteId, id))!;
}

/** A study that is not queued or running, or a 409 naming what to do. */
async function settledStudy(deps: Deps, siteId: number, id: number, doing: string) {
  const row = await getStudyRow(deps.db, siteId, id);
  if (!row) throw notFound('Study');
  if (isActive(await studyJobOf(deps, id))) throw new AppError('conflict', 'study_running', `This study is still running; cancel it before ${doing} it`);
  return row;
}

/** Deletes a finished, failed or cancelled study (a running one is cancelled first); reruns of it keep their figures. Audited. */
export async function deleteStudy(deps: Deps, siteId: number, userId: number, id: number): Promise<{ ok: true }> {
  const row = await settledStudy(deps, siteId, id, 'deleting');
  await deleteStudyRow(deps.db, siteId, id);
  await audit(deps.db, { siteId, userId, action: 'study.deleted', subject: row.name, detail: { studyId: id, status: row.status } });
  const planCache = planCacheOf(deps.db);
  for (const key of [...planCache.keys()]) if (key.startsWith(`${id}:`)) planCache.delete(key);
  return { ok: true };
}

/** Archives (hides from the default list) or unarchives a study that is not running; audited. Doing it twice changes nothing. */
export async function archiveStudy(deps: Deps, siteId: number, userId: number, id: number, archived: boolean): Promise<StudySummary> {
  const row = await settledStudy(deps, siteId, id, archived ? 'archiving' : 'unarchiving');
  if ((row.archived_at !== null) !== archived) {
    await setStudyStatus(deps.db, id, { archived_at: archived ? nowIso() : null });
    await audit(deps.db, { siteId, userId, action: archived ? 'study.archived' : 'study.unarchived', subject: row.name, detail: { studyId: id } });
  }
  return (await getStudySummary(deps, siteId, id))!;
}

const layoutOf = (r: Omit<DbStudyLayoutRow, 'geometry'> & { creator: string | null }): CandidateLayout => ({
  id: r.id,
  name: r.name,
  filename: r.filename,
  stats: JSON.parse(r.stats) as CandidateLayout['stats'],
  createdBy: r.creator,
  createdAt: r.created_at,
});

/**
 * A candidate layout for what-if studies: the workbook is checked by the floor-plan upload's own check
 * (same sheets, same row-by-row problems); with any error nothing is saved and the problems are answered.
 */
export async function uploadCandidateLayout(
  deps: Deps,
  siteId: number,
  userId: number,
  file: { bytes: Uint8Array; filename: string; name?: string },
): Promise<CandidateLayoutUpload> {
  const check = await checkFloorPlanFile(file.bytes, file.filename);
  if (!check.ok || !check.plan) return { ok: false, errors: check.errors, warnings: check.warnings, layout: null };
  const name = file.name?.trim() || file.filename.replace(/\.(xlsx|xls|csv)$/i, '').trim() || 'Candidate layout';
  const id = await insertStudyLayout(deps.db, {
    site_id: siteId,
    name: name.slice(0, 120),
    filename: file.filename.slice(0, 200),
    geometry: JSON.stringify(check.plan),
    stats: JSON.stringify(check.stats),
    created_by: userId,
    created_at: nowIso(),
  });
  const layout = (await listStudyLayoutRows(deps.db, siteId)).find((r) => r.id === id)!;
  return { ok: true, errors: [], warnings: check.warnings, layout: layoutOf(layout) };
}

export async function listCandidateLayouts(deps: Deps, siteId: number): Promise<CandidateLayout[]> {
  return (await listStudyLayoutRows(deps.db, siteId)).map(layoutOf);
}

/** A new study with the same inputs and seed (named "… (rerun)"). */
export async function rerunStudy(deps: Deps, siteId: number, userId: number, id: number): Promise<StudySummary> {
  const row = await getStudyRow(deps.db, siteId, id);
  if (!row) throw notFound('Study');
  const inputs = StudyInputs.parse(JSON.parse(row.inputs));
  const name = inputs.name.endsWith('(rerun)') ? inputs.name : `${inputs.name.slice(0, 110)} (rerun)`;
  return createStudy(deps, siteId, userId, { ...inputs, name }, id);
}

/**
 * Built variant plans of recently viewed studies (route drawing), a few at a time, per database: study
 * ids are only unique within one (a process may hold several: tests, benchmarks).
 */
const planCaches = new WeakMap<Knex, Map<string, BuiltPlan>>();
const planCacheOf = (db: Knex): Map<string, BuiltPlan> => {
  let c = planCaches.get(db);
  if (!c) planCaches.set(db, (c = new Map()));
  return c;
};
const PLAN_CACHE_LIMIT = 6;

async function variantPlan(db: Knex, siteId: number, detail: StudyDetail, variant: string): Promise<BuiltPlan> {
  const key = `${detail.id}:${variant}`;
  const planCache = planCacheOf(db);
  const hit = planCache.get(key);
  if (hit) return hit;
  const results = detail.results;
  const v = results?.variants.find((x) => x.key === variant);
  if (!results || !v) throw notFound('Study plan');
  let recordedPlanId: number | null = null;
  let depotIdx = 0;
  if (detail.inputs.work.kind === 'recorded') {
    const r = await recordedWork(db, siteId, detail.inputs);
    recordedPlanId = r.planId;
    depotIdx = r.depotIdx;
  }
  const base = await basePlanOf(db, siteId, detail.inputs, recordedPlanId, depotIdx);
  const on = v.layoutId === null ? base : await candidatePlan(db, siteId, v.layoutId, base, 0);
  const built = buildPlan(v.changes.length ? applyChanges(on, v.changes) : on);
  planCache.set(key, built);
  while (planCache.size > PLAN_CACHE_LIMIT) planCache.delete(planCache.keys().next().value!);
  return built;
}

async function doneStudy(db: Knex, siteId: number, id: number): Promise<StudyDetail & { results: StudyResults }> {
  const row = await getStudyRow(db, siteId, id);
  if (!row) throw notFound('Study');
  const detail = toDetail(row);
  if (!detail.results) throw new AppError('conflict', 'study_not_done', 'This study has no results yet');
  return detail as StudyDetail & { results: StudyResults };
}

/** The plan of one variant (geometry and closures) for the maps. */
export async function studyPlan(
  db: Knex,
  siteId: number,
  id: number,
  variant: string,
): Promise<{ geometry: PlanGeometry; closures: { kind: 'aisle' | 'cross_aisle'; code: string; from: number; to: number }[] }> {
  const detail = await doneStudy(db, siteId, id);
  const plan = await variantPlan(db, siteId, detail, variant);
  return { geometry: plan.input.geometry, closures: plan.input.closures };
}

/** One trip's route by one method on one variant. */
export async function studyRoute(db: Knex, siteId: number, id: number, q: { variant: string; trip: number; method: RoutingMethodKey }): Promise<StudyRoute> {
  const detail = await doneStudy(db, siteId, id);
  const v = detail.results.variants.find((x) => x.key === q.variant);
  const trip = v?.trips.find((t) => t.n === q.trip);
  if (!v || !trip) throw notFound('Trip');
  const plan = await variantPlan(db, siteId, detail, q.variant);
  const r = tripRoute(plan, trip, q.method, detail.results.seed);
  return { method: q.method, label: ROUTING_LABELS[q.method], ...r };
}

export { doneStudy };
