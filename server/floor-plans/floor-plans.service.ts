/**
 * Floor plans: draft → active → retired, one active plan per site, version numbers per site.
 * Heavy work (parsing, checking, walk graph, distances) runs in worker threads; saving runs in small
 * chunks with a yield between them, so other requests keep being served during a 50,000-bin build.
 * Services throw AppError and never see HTTP.
 */
import { withAdvisoryLock } from '../db/dialect';
import { setImmediate as yieldToLoop } from 'node:timers/promises';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type {
  ActivationCheck,
  ActiveFloorPlan,
  ClosureOutcome,
  ClosureResult,
  DistanceAnswer,
  FloorPlanDetail,
  FloorPlanJob,
  FloorPlanSummary,
  GeneratePlanParams,
} from '../../shared/floor-plans';
import type { RowIssue } from '../../shared/imports';
import type { z } from 'zod';
import type { CloseSegmentBody as CloseSegmentSchema } from '../../shared/floor-plans';
import { pairDistance } from '../core/plan/distances';
import type { RectangularPlanParams } from '../core/plan/generate';
import { POSITION_TOLERANCE_M, type PlanClosure, type PlanGeometry } from '../core/plan/types';
import { rerouteOpenTrips } from '../picking/reroute';
import { nowIso } from '../db/knex';
import { audit } from '../audit/audit';
import { AppError, notFound } from '../http/errors';
import { jobStopMessage, WorkerCancelledError } from '../workers/spawn';
import { BUILD_BUDGET_MS, runBuild, type BuildOutput } from './build';
import * as repo from './floor-plans.repository';
import { checkFloorPlanFile } from './import';
import { FLOOR_PLAN_BUILD_JOB, startJob, type BuildJobData, type JobControl, type JobOutcome } from './jobs';
import type { Deps } from '../deps';
import type { JobKind } from '../workers/jobs';
import { forgetPlanIndex, loadPlanIndex } from './plan-index';
import { packPlan, unpackPlan } from './packed-plan';
import { unreachableBinCodes } from './reachability';
import { computeActivationCheck, publicCheck, type FullActivationCheck } from './activation-check';

type CloseSegment = z.output<typeof CloseSegmentSchema>;

// ---- reading ----

async function summaryOf(db: Knex, row: repo.DbFloorPlanRow): Promise<FloorPlanSummary> {
  const [name, closures, inUse] = await Promise.all([repo.userName(db, row.uploaded_by), repo.listOpenClosures(db, row.id), repo.isPlanInUse(db, row.id)]);
  return repo.toSummary(row, { uploaderName: name, openClosures: closures.length, inUse });
}

export async function listPlans(db: Knex, siteId: number): Promise<FloorPlanSummary[]> {
  const rows = await repo.listPlanRows(db, siteId);
  const inUse = await repo.plansInUse(
    db,
    rows.map((r) => r.id),
  );
  return rows.map((r) => repo.toSummary(r, { uploaderName: r.uploader_name, openClosures: Number(r.open_closures), inUse: inUse.has(r.id) }));
}

async function mustPlan(db: Knex, siteId: number, planId: number): Promise<repo.DbFloorPlanRow> {
  const row = Number.isInteger(planId) && planId > 0 ? await repo.getPlanRow(db, siteId, planId) : undefined;
  if (!row) throw notFound('Floor plan');
  return row;
}

export async function getPlanDetail(db: Knex, siteId: number, planId: number): Promise<FloorPlanDetail> {
  const row = await mustPlan(db, siteId, planId);
  const loaded = await loadPlanIndex(db, planId);
  const summary = await summaryOf(db, row);
  return {
    ...summary,
    warnings: JSON.parse(row.warnings) as RowIssue[],
    closures: loaded.closureRows,
    unreachableBins: unreachableBinCodes(loaded.geometry, loaded.graph),
  };
}

export async function getGeometry(db: Knex, siteId: number, planId: number): Promise<PlanGeometry> {
  await mustPlan(db, siteId, planId);
  return (await loadPlanIndex(db, planId)).geometry;
}

/** The active plan with its geometry, for every map including the picker's trip map. */
export async function getActivePlan(db: Knex, siteId: number): Promise<ActiveFloorPlan> {
  const row = await repo.activePlanRow(db, siteId);
  if (!row) throw new AppError('not_found', 'no_active_plan', 'This site has no active floor plan yet');
  const loaded = await loadPlanIndex(db, row.id);
  return { plan: await summaryOf(db, row), geometry: loaded.geometry, closures: loaded.closureRows };
}

/** Shortest walking distance between two bins under the plan's open closures; null when no walk joins them. */
export async function binDistance(db: Knex, siteId: number, planId: number, from: string, to: string): Promise<DistanceAnswer> {
  await mustPlan(db, siteId, planId);
  const loaded = await loadPlanIndex(db, planId);
  const issues = [];
  if (loaded.binIndex(from) === undefined) issues.push({ field: 'from', message: `bin ${from} is not on this plan` });
  if (loaded.binIndex(to) === undefined) issues.push({ field: 'to', message: `bin ${to} is not on this plan` });
  if (issues.length) throw new AppError('validation', 'validation_failed', issues.map((i) => i.message).join('; '), issues);
  const a = loaded.binNode(from);
  const b = loaded.binNode(to);
  const d = a === undefined || b === undefined ? Infinity : pairDistance(loaded.index, a, b);
  return { from, to, metres: Number.isFinite(d) ? Math.round(d * 1000) / 1000 : null };
}

// ---- state changes ----

const skusWithoutBinLinks = (siteId: number, planId: number) => {
  const base = `/api/sites/${siteId}/floor-plans/${planId}/activation-check/skus-without-bin`;
  return { xlsx: `${base}?format=xlsx`, csv: `${base}?format=csv` };
};

/** What activating the plan would take away (see activation-check.ts), with every SKU without a bin. */
export async function activationCheckFull(db: Knex, siteId: number, planId: number): Promise<FullActivationCheck> {
  const row = await mustPlan(db, siteId, planId);
  return computeActivationCheck(db, siteId, row, skusWithoutBinLinks(siteId, planId));
}

export async function activationCheck(db: Knex, siteId: number, planId: number): Promise<ActivationCheck> {
  return publicCheck(await activationCheckFull(db, siteId, planId));
}

/**
 * Activates a draft, or a retired plan again (rollback, no re-upload); the active plan is retired.
 * When SKUs would lose their bin or open orders their placement, it refuses (409
 * activation_needs_acknowledgement, the check in `details`) unless `acknowledge` is set.
 */
export async function activatePlan(
  db: Knex,
  siteId: number,
  planId: number,
  userId: number,
  options: { acknowledge?: boolean } = {},
): Promise<FloorPlanDetail> {
  const row = await mustPlan(db, siteId, planId);
  if (row.state === 'active') return getPlanDetail(db, siteId, planId);
  const check = publicCheck(await computeActivationCheck(db, siteId, row, skusWithoutBinLinks(siteId, planId)));
  if (check.needsAcknowledgement && options.acknowledge !== true) {
    const what = [
      check.skusLosingBin ? `${check.skusLosingBin} SKU${check.skusLosingBin === 1 ? '' : 's'} without a bin` : null,
      check.openOrdersLosingPlacement
        ? `${check.openOrdersLosingPlacement} open order${check.openOrdersLosingPlacement === 1 ? '' : 's'} that cannot be placed`
        : null,
    ]
      .filter(Boolean)
      .join(' and ');
    throw new AppError(
      'conflict',
      'activation_needs_acknowledgement',
      `Activating v${row.version} would leave ${what} compared with the active plan. Review the activation check and send { "acknowledge": true } to activate anyway.`,
      check,
    );
  }
  const now = nowIso();
  await db.transaction(async (trx) => {
    // Re-read inside the transaction: a concurrent activation must not leave two active plans, and
    // the check must still be about the plan that gets retired.
    const fresh = await repo.getPlanRow(trx, siteId, planId);
    const active = await repo.activePlanRow(trx, siteId);
    if (fresh?.state !== row.state || (active?.id ?? null) !== (check.currentPlan?.id ?? null)) {
      throw new AppError('conflict', 'plan_changed', 'The floor plans changed meanwhile; reload and try again');
    }
    const retired = await repo.retireActive(trx, siteId, now);
    await repo.setActive(trx, planId, now);
    await audit(trx, {
      siteId,
      userId,
      action: row.state === 'retired' ? 'floor_plan.reactivated' : 'floor_plan.activated',
      subject: `v${row.version}`,
      detail: {
        planId,
        retired,
        acknowledged: check.needsAcknowledgement,
        skusLosingBin: check.skusLosingBin,
        openOrdersLosingPlacement: check.openOrdersLosingPlacement,
      },
    });
  });
  return getPlanDetail(db, siteId, planId);
}

export async function renamePlan(db: Knex, siteId: number, planId: number, name: string, userId: number): Promise<FloorPlanDetail> {
  const row = await mustPlan(db, siteId, planId);
  if (row.state === 'retired' || (await repo.isPlanInUse(db, planId)))
    throw new AppError('conflict', 'plan_read_only', 'Retired plans and plans used by waves cannot be changed');
  await repo.renamePlan(db, planId, name);
  await audit(db, { siteId, userId, action: 'floor_plan.renamed', subject: `v${row.version}`, detail: { planId, name } });
  return getPlanDetail(db, siteId, planId);
}

/** Deletes a draft nobody planned on. */
export async function deleteDraft(db: Knex, siteId: number, planId: number, userId: number): Promise<void> {
  const row = await mustPlan(db, siteId, planId);
  if (row.state !== 'draft') throw new AppError('conflict', 'not_a_draft', 'Only drafts can be deleted; active and retired plans are kept');
  if (await repo.isPlanInUse(db, planId)) throw new AppError('conflict', 'plan_read_only', 'Waves were planned on this plan; it is kept');
  await repo.deletePlan(db, planId);
  forgetPlanIndex(db, planId);
  await audit(db, { siteId, userId, action: 'floor_plan.deleted', subject: `v${row.version}`, detail: { planId } });
}

// ---- building and saving ----

interface SaveMeta {
  siteId: number;
  userId: number;
  name: string;
  source: 'upload' | 'generated';
  sourceFilename: string | null;
  generatorParams: GeneratePlanParams | null;
  warnings: RowIssue[];
}

/**
 * Stores a built plan as a draft: the plan row in state 'building', the geometry in chunks with a
 * yield to the event loop between them, then arrays, version number and state in one transaction.
 * On any failure the half-saved plan is deleted, so nothing of it remains.
 */
export async function saveBuiltPlan(
  db: Knex,
  meta: SaveMeta,
  plan: PlanGeometry,
  built: BuildOutput,
  onProgress?: (fraction: number) => void,
  signal?: AbortSignal,
): Promise<number> {
  // Saves run one at a time, so any plan still 'building' now was left by a stopped server.
  await repo.purgeUnfinishedPlans(db);
  const planId = await repo.insertBuildingPlan(
    db,
    {
      site_id: meta.siteId,
      name: meta.name,
      source: meta.source,
      source_filename: meta.sourceFilename,
      generator_params: meta.generatorParams ? JSON.stringify(meta.generatorParams) : null,
      uploaded_by: meta.userId,
      stats: built.stats,
      node_count: built.nodeCount,
      hub_count: built.hubCount,
      stored_bytes: built.storedBytes,
      build_ms: built.buildMs,
      warnings: meta.warnings,
    },
    nowIso(),
  );
  try {
    const chunks = repo.geometryInsertChunks(planId, plan);
    for (let i = 0; i < chunks.length; i++) {
      if (signal?.aborted) throw new WorkerCancelledError();
      await repo.insertRows(db, chunks[i]!.table, chunks[i]!.rows);
      onProgress?.((i + 1) / (chunks.length + 1));
      await yieldToLoop();
    }
    let version = 0;
    await db.transaction(async (trx) => {
      // Cancelled while saving: the draft is not committed (and the half-saved rows go below).
      if (signal?.aborted) throw new WorkerCancelledError();
      await repo.replaceGraph(trx, planId, 0, built.graph, built.index);
      version = await repo.nextVersion(trx, meta.siteId);
      await repo.setPlanDraft(trx, planId, version);
      await audit(trx, {
        siteId: meta.siteId,
        userId: meta.userId,
        action: 'floor_plan.draft_saved',
        subject: `v${version}`,
        detail: { planId, source: meta.source, bins: built.stats.bins },
      });
    });
    onProgress?.(1);
    return planId;
  } catch (err) {
    await repo.deletePlan(db, planId);
    throw err;
  }
}

/** A job failure in words for the user; anything unexpected is logged in full and summarised. */
function failureDescriber(logger: Logger): (err: unknown) => string {
  return (err) => {
    if (err instanceof AppError) return err.message;
    const stopped = jobStopMessage('The floor-plan job', err);
    if (stopped) return stopped;
    logger.error({ err }, 'floor-plan job failed');
    return 'Building the plan failed on the server; it has been logged';
  };
}

async function buildWithProgress(control: JobControl, input: Parameters<typeof runBuild>[0]): Promise<BuildOutput> {
  return runBuild(input, (p) => control.progress(p.phase, p.fraction), control.signal);
}

const stripExtension = (filename: string) => filename.replace(/\.(xlsx|xls|csv)$/i, '').trim();

/**
 * Starts an upload job: check every row (worker), then walk graph and distances (worker), then save a
 * draft. A file with errors ends the job as 'invalid' with its RowIssue table and saves nothing.
 */
export function startUpload(deps: Deps, input: { siteId: number; userId: number; bytes: Uint8Array; filename: string; name?: string }): Promise<FloorPlanJob> {
  const { bytes, ...rest } = input;
  return startJob(deps, { kind: 'upload', ...rest, bytes: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('base64') });
}

async function runUpload(
  db: Knex,
  input: { siteId: number; userId: number; bytes: Uint8Array; filename: string; name?: string },
  control: JobControl,
): Promise<JobOutcome> {
  control.progress('parsing', 0);
  const check = await checkFloorPlanFile(input.bytes, input.filename, { onProgress: (p) => control.progress(p.phase, p.fraction), signal: control.signal });
  if (!check.ok || !check.plan) {
    return {
      status: 'invalid',
      errors: check.errors,
      warnings: check.warnings,
      message: `${check.errors.length} problem${check.errors.length === 1 ? '' : 's'} found; nothing was saved`,
    };
  }
  const plan = check.plan;
  const built = await buildWithProgress(control, { kind: 'geometry', plan: packPlan(plan), closures: [], budgetMs: BUILD_BUDGET_MS });
  control.progress('saving', 0);
  const name = input.name?.trim() || stripExtension(input.filename) || 'Uploaded plan';
  const planId = await saveBuiltPlan(
    db,
    { siteId: input.siteId, userId: input.userId, name, source: 'upload', sourceFilename: input.filename, generatorParams: null, warnings: check.warnings },
    plan,
    built,
    (f) => control.progress('saving', f),
    control.signal,
  );
  return { status: 'done', planId, warnings: check.warnings };
}

export const engineParams = (p: GeneratePlanParams): RectangularPlanParams => ({
  aisles: p.aisles,
  aisleLengthM: p.aisleLengthM,
  aisleSpacingM: p.aisleSpacingM,
  baysPerAisle: p.baysPerAisle,
  levels: p.levels,
  bothSides: p.bothSides,
  crossAisles: { front: p.crossAisles.front, back: p.crossAisles.back, middle: p.crossAisles.middle },
  crossAisleWidthM: p.crossAisleWidthM,
  depot: { at: p.depot },
});

/** Starts a job that generates a rectangular plan from parameters and saves it as a draft. */
export function startGenerate(deps: Deps, input: { siteId: number; userId: number; name: string; params: GeneratePlanParams }): Promise<FloorPlanJob> {
  return startJob(deps, { kind: 'generate', ...input });
}

async function runGenerate(
  db: Knex,
  input: { siteId: number; userId: number; name: string; params: GeneratePlanParams },
  control: JobControl,
): Promise<JobOutcome> {
  const built = await buildWithProgress(control, { kind: 'generate', params: engineParams(input.params), closures: [], budgetMs: BUILD_BUDGET_MS });
  control.progress('saving', 0);
  const planId = await saveBuiltPlan(
    db,
    { siteId: input.siteId, userId: input.userId, name: input.name, source: 'generated', sourceFilename: null, generatorParams: input.params, warnings: [] },
    unpackPlan(built.plan!),
    built,
    (f) => control.progress('saving', f),
    control.signal,
  );
  return { status: 'done', planId, warnings: [] };
}

/** Plan builds (upload and generate) as one job kind: one build at a time per instance. */
export function floorPlanBuildJob(deps: Deps): JobKind<BuildJobData, JobOutcome> {
  return {
    name: FLOOR_PLAN_BUILD_JOB,
    run: (data, job) => {
      const control: JobControl = { progress: (phase, fraction) => job.progress(fraction, phase), signal: job.signal };
      if (data.kind === 'upload') {
        const { bytes, kind: _kind, ...rest } = data;
        return runUpload(deps.db, { ...rest, bytes: new Uint8Array(Buffer.from(bytes, 'base64')) }, control);
      }
      const { kind: _kind, ...rest } = data;
      return runGenerate(deps.db, rest, control);
    },
    describeFailure: failureDescriber(deps.logger),
    expireInSeconds: 10 * 60,
  };
}

// ---- closures ----

/**
 * One closure change per plan at a time, so two supervisors cannot overwrite each other's arrays: in
 * this process by a promise chain, and between instances on PostgreSQL by an advisory lock as well.
 */
const planLockChains = new WeakMap<Knex, Map<number, Promise<unknown>>>();
function withPlanLock<T>(db: Knex, planId: number, work: () => Promise<T>): Promise<T> {
  // Per database: plan ids are only unique within one (a process may hold several: tests, benchmarks).
  let planLocks = planLockChains.get(db);
  if (!planLocks) planLockChains.set(db, (planLocks = new Map()));
  const task = () => withAdvisoryLock(db, `floor-plan-closures:${planId}`, work);
  const prev = planLocks.get(planId) ?? Promise.resolve();
  const run = prev.then(task, task);
  const tail = run.catch(() => undefined);
  planLocks.set(planId, tail);
  void tail.then(() => {
    if (planLocks!.get(planId) === tail) planLocks!.delete(planId);
  });
  return run;
}

function checkClosureTarget(plan: PlanGeometry, c: CloseSegment): void {
  if (c.kind === 'aisle') {
    const aisle = plan.aisles.find((a) => a.code === c.code);
    if (!aisle)
      throw new AppError('validation', 'validation_failed', `Aisle ${c.code} is not on this plan`, [
        { field: 'code', message: `aisle ${c.code} is not on this plan` },
      ]);
    const lo = Math.min(aisle.yStart, aisle.yEnd);
    const hi = Math.max(aisle.yStart, aisle.yEnd);
    if (c.toM <= lo || c.fromM >= hi) {
      throw new AppError('validation', 'validation_failed', `Aisle ${c.code} runs from ${lo} m to ${hi} m; the closed range must overlap it`, [
        { field: 'fromM', message: `outside ${lo}–${hi} m` },
      ]);
    }
  } else {
    const cross = plan.crossAisles.find((a) => a.code === c.code);
    if (!cross)
      throw new AppError('validation', 'validation_failed', `Cross aisle ${c.code} is not on this plan`, [
        { field: 'code', message: `cross aisle ${c.code} is not on this plan` },
      ]);
    const lo = Math.min(cross.xStart, cross.xEnd);
    const hi = Math.max(cross.xStart, cross.xEnd);
    if (c.toM <= lo || c.fromM >= hi) {
      throw new AppError('validation', 'validation_failed', `Cross aisle ${c.code} runs from ${lo} m to ${hi} m; the closed range must overlap it`, [
        { field: 'fromM', message: `outside ${lo}–${hi} m` },
      ]);
    }
  }
}

/** Rebuilds graph and distances with `closures` in a worker, then stores them with the closure change. */
async function rebuildWithClosures(
  db: Knex,
  siteId: number,
  planId: number,
  closures: PlanClosure[],
  change: (trx: Knex.Transaction) => Promise<void>,
): Promise<{ before: string[]; after: string[] }> {
  const loaded = await loadPlanIndex(db, planId);
  const before = unreachableBinCodes(loaded.geometry, loaded.graph);
  const built = await runBuild({ kind: 'geometry', plan: packPlan(loaded.geometry), closures, budgetMs: BUILD_BUDGET_MS });
  const row = await mustPlan(db, siteId, planId);
  const nextVersion = row.closure_version + 1;
  await db.transaction(async (trx) => {
    await change(trx);
    await repo.replaceGraph(trx, planId, nextVersion, built.graph, built.index);
    await repo.setClosureVersion(trx, planId, nextVersion);
  });
  return { before, after: built.unreachableBins };
}

const metresText = (m: number) => `${Math.round(m * 100) / 100} m`;
const stretchText = (c: { kind: 'aisle' | 'cross_aisle'; code: string; fromM: number; toM: number }) =>
  `${c.kind === 'aisle' ? 'Aisle' : 'Cross aisle'} ${c.code} from ${metresText(c.fromM)} to ${metresText(c.toM)}`;
const binsText = (n: number) => `${n} bin${n === 1 ? '' : 's'}`;

/** The reachability sentence, worded from the same lists the answer carries so the two never disagree. */
function reachText(after: readonly string[], newly: readonly string[]): string {
  if (after.length === 0) return 'Every bin can still be reached.';
  if (newly.length === 0) return `No more bins are cut off; ${binsText(after.length)} ${after.length === 1 ? 'remains' : 'remain'} unreachable.`;
  const all = after.length > newly.length ? `; ${binsText(after.length)} are unreachable in all` : '';
  return `${binsText(newly.length)} can no longer be reached${all}.`;
}

async function closureResult(
  db: Knex,
  siteId: number,
  planId: number,
  r: { before: string[]; after: string[] },
  done: { outcome: ClosureOutcome; closureId: number | null; what: string },
): Promise<ClosureResult> {
  const was = new Set(r.before);
  const newly = r.after.filter((c) => !was.has(c));
  const plan = await getPlanDetail(db, siteId, planId);
  return {
    plan,
    outcome: done.outcome,
    closure: plan.closures.find((c) => c.id === done.closureId) ?? null,
    message: `${done.what} ${reachText(r.after, newly)}`,
    unreachableBins: r.after,
    newlyUnreachable: newly,
  };
}

/**
 * Closes a stretch of an aisle or cross aisle; distances are recomputed and unreachable bins listed.
 * A stretch an open closure already covers is not stored again: that closure is returned. A stretch
 * overlapping open closures of the same aisle extends the first of them to cover all (the others are
 * merged into it), so one stretch is never stored twice.
 */
export async function closeSegment(db: Knex, siteId: number, planId: number, body: CloseSegment, userId: number): Promise<ClosureResult> {
  const row = await mustPlan(db, siteId, planId);
  if (row.state === 'retired') throw new AppError('conflict', 'plan_read_only', 'Retired plans are read-only');
  return withPlanLock(db, planId, async () => {
    const loaded = await loadPlanIndex(db, planId);
    checkClosureTarget(loaded.geometry, body);
    const tol = POSITION_TOLERANCE_M;
    const same = loaded.closureRows.filter((c) => c.kind === body.kind && c.code === body.code);
    const covering = same.find((c) => c.fromM <= body.fromM + tol && c.toM >= body.toM - tol);
    if (covering) {
      const now = unreachableBinCodes(loaded.geometry, loaded.graph);
      const by = covering.createdBy ? ` by ${covering.createdBy.name}` : '';
      return closureResult(
        db,
        siteId,
        planId,
        { before: now, after: now },
        {
          outcome: 'already_closed',
          closureId: covering.id,
          what: `${stretchText(covering)} is already closed (closed${by}); nothing was changed.`,
        },
      );
    }
    const overlapping = same.filter((c) => c.fromM < body.toM - tol && c.toM > body.fromM + tol);
    const keep = overlapping[0];
    if (keep) {
      const merged = overlapping.slice(1);
      const fromM = Math.min(body.fromM, ...overlapping.map((c) => c.fromM));
      const toM = Math.max(body.toM, ...overlapping.map((c) => c.toM));
      const closures = loaded.closureRows.filter((c) => !merged.includes(c)).map((c) => repo.toEngineClosure(c.id === keep.id ? { ...c, fromM, toM } : c));
      const r = await rebuildWithClosures(db, siteId, planId, closures, async (trx) => {
        await repo.setClosureRange(trx, planId, keep.id, fromM, toM);
        for (const c of merged) await repo.reopenClosure(trx, planId, c.id, userId, nowIso());
        await audit(trx, {
          siteId,
          userId,
          action: 'floor_plan.segment_extended',
          subject: `${body.kind} ${body.code}`,
          detail: {
            planId,
            closureId: keep.id,
            wasFromM: keep.fromM,
            wasToM: keep.toM,
            fromM,
            toM,
            mergedClosureIds: merged.map((c) => c.id),
            reason: body.reason ?? null,
          },
        });
      });
      await rerouteOpenTrips(db, planId, loaded, userId);
      const was = overlapping.map((c) => `${metresText(c.fromM)}–${metresText(c.toM)}`).join(', ');
      return closureResult(db, siteId, planId, r, {
        outcome: 'extended',
        closureId: keep.id,
        what: `${stretchText({ ...body, fromM, toM })}: closed; it overlapped the open closure${overlapping.length === 1 ? '' : 's'} at ${was}, now one closure.`,
      });
    }
    const closures = [...loaded.closures, { kind: body.kind, code: body.code, from: body.fromM, to: body.toM }];
    let closureId = 0;
    const r = await rebuildWithClosures(db, siteId, planId, closures, async (trx) => {
      const id = await repo.insertClosure(
        trx,
        { planId, kind: body.kind, code: body.code, fromM: body.fromM, toM: body.toM, reason: body.reason ?? null, userId },
        nowIso(),
      );
      closureId = id;
      await audit(trx, {
        siteId,
        userId,
        action: 'floor_plan.segment_closed',
        subject: `${body.kind} ${body.code}`,
        detail: { planId, closureId: id, fromM: body.fromM, toM: body.toM, reason: body.reason ?? null },
      });
    });
    // Trips being picked on this plan walk the changed graph from where their pickers are.
    await rerouteOpenTrips(db, planId, loaded, userId);
    return closureResult(db, siteId, planId, r, { outcome: 'closed', closureId, what: `${stretchText(body)}: closed.` });
  });
}

/** Reopens a closed stretch; distances are recomputed. */
export async function reopenSegment(db: Knex, siteId: number, planId: number, closureId: number, userId: number): Promise<ClosureResult> {
  const row = await mustPlan(db, siteId, planId);
  if (row.state === 'retired') throw new AppError('conflict', 'plan_read_only', 'Retired plans are read-only');
  return withPlanLock(db, planId, async () => {
    const loaded = await loadPlanIndex(db, planId);
    if (!loaded.closureRows.some((c) => c.id === closureId)) throw notFound('Closure');
    const closures = loaded.closureRows.filter((c) => c.id !== closureId).map(repo.toEngineClosure);
    const r = await rebuildWithClosures(db, siteId, planId, closures, async (trx) => {
      if (!(await repo.reopenClosure(trx, planId, closureId, userId, nowIso()))) throw notFound('Closure');
      await audit(trx, { siteId, userId, action: 'floor_plan.segment_reopened', subject: String(closureId), detail: { planId, closureId } });
    });
    await rerouteOpenTrips(db, planId, loaded, userId);
    const reopened = loaded.closureRows.find((c) => c.id === closureId)!;
    return closureResult(db, siteId, planId, r, { outcome: 'reopened', closureId: null, what: `${stretchText(reopened)}: open again.` });
  });
}
