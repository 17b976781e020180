/**
 * Slotting runs for the site: the engineer starts one on the active plan with an order history (picks
 * recorded on the tablets, or an uploaded order file); it runs off the event loop, one at a time; the
 * supervisor applies its moves (all or some) to the SKU master in one audited step.
 */
import type { Knex } from 'knex';
import type { Deps } from '../deps';
import { audit } from '../audit/audit';
import type { HistoryOrder } from '../core/slotting/types';
import { nowIso } from '../db/knex';
import { activePlanId, loadPlanIndex } from '../floor-plans/plan-index';
import { AppError, notFound } from '../http/errors';
import { readTableFile } from '../orders/orders.files';
import { validateOrderRows } from '../orders/orders.validate';
import { getCartProfile, getSiteRow } from '../sites/sites.repository';
import { jobStopMessage, runInWorker } from '../workers/spawn';
import { isActive, type JobContext, type JobKind, type JobRecord } from '../workers/jobs';
import {
  SlottingApplyBody,
  SlottingInputs,
  SlottingResults,
  type SlottingApplyResult,
  type SlottingHistoryUpload,
  type SlottingInputsBody,
  type SlottingRunDetail,
  type SlottingRunSummary,
} from '../../shared/slotting';
import type { SlottingJobInput } from './slotting.job';
import {
  getHistory,
  getRunRow,
  insertBinHistory,
  insertHistory,
  insertRun,
  listRunRows,
  openWaveSkus,
  recordedPickLines,
  setRun,
  setSkuBin,
  skuRowsOf,
  type DbSlottingRunRow,
} from './slotting.repository';

const DAY_MS = 86_400_000;
/** A queued or running row without a live job this long after it was saved was cut off. */
const ORPHAN_AFTER_MS = 30_000;
/** A run that has not finished in this long is stopped (a large site's search takes a few minutes at most). */
const RUN_TIMEOUT_MS = 15 * 60_000;
/** Seconds the search may spend improving, beside the before/after measurements. */
const SEARCH_BUDGET_MS = 20_000;

export const SLOTTING_JOB = 'slotting-run';
/** The job key of a run: its newest job tells its live progress. */
const runKey = (id: number) => `slotting:${id}`;

/** What a run's job is given (JSON): the run and everything it needs, read and checked when it was started. */
interface SlottingRunData {
  siteId: number;
  runId: number;
  job: SlottingJobInput;
}

type Live = { progress: number } | undefined;
const liveOf = (r: JobRecord | null): Live => (r && isActive(r) ? { progress: r.progress } : undefined);
const runJobOf = (deps: Deps, id: number) => deps.jobs.latest(runKey(id));

const dayText = (day: number): string => new Date(day * DAY_MS).toISOString().slice(0, 10);

function summaryOf(r: Omit<DbSlottingRunRow, 'results' | 'inputs'> & { creator: string | null }, live?: Live): SlottingRunSummary {
  return {
    id: r.id,
    name: r.name,
    method: r.method as SlottingRunSummary['method'],
    status: r.status,
    progress: r.status === 'done' ? 1 : (live?.progress ?? 0),
    error: r.error,
    createdBy: r.creator,
    createdAt: r.created_at,
    finishedAt: r.finished_at,
    appliedMoves: r.applied_moves,
    appliedAt: r.applied_at,
  };
}

/** A run left queued or running by a restart has nobody working on it: say so. */
async function settleOrphan<T extends { id: number; site_id: number; status: string; error: string | null; finished_at: string | null; created_at: string }>(
  deps: Deps,
  row: T,
  job: JobRecord | null,
): Promise<T> {
  // A row just saved may not have its job yet (the submit is a moment after the insert).
  if ((row.status === 'queued' || row.status === 'running') && !isActive(job) && Date.now() - Date.parse(row.created_at) > ORPHAN_AFTER_MS) {
    // The job may have ended a moment ago and be writing the row: read it again first.
    const again = await getRunRow(deps.db, row.site_id, row.id);
    if (again && again.status !== 'queued' && again.status !== 'running') return { ...row, ...again };
    const error = 'The server restarted while this run was working; start it again';
    const finished = nowIso();
    await setRun(deps.db, row.id, { status: 'failed', error, finished_at: finished });
    return { ...row, status: 'failed', error, finished_at: finished };
  }
  return row;
}

export async function listRuns(deps: Deps, siteId: number): Promise<SlottingRunSummary[]> {
  const rows = await listRunRows(deps.db, siteId);
  return Promise.all(
    rows.map(async (r) => {
      const job = r.status === 'queued' || r.status === 'running' ? await runJobOf(deps, r.id) : null;
      return summaryOf(await settleOrphan(deps, r, job), liveOf(job));
    }),
  );
}

export async function getRun(deps: Deps, siteId: number, id: number): Promise<SlottingRunDetail> {
  const found = await getRunRow(deps.db, siteId, id);
  if (!found) throw notFound('Slotting run');
  const job = found.status === 'queued' || found.status === 'running' ? await runJobOf(deps, id) : null;
  const row = await settleOrphan(deps, found, job);
  return {
    ...summaryOf(row, liveOf(job)),
    inputs: SlottingInputs.parse(JSON.parse(row.inputs)),
    results: row.results ? SlottingResults.parse(JSON.parse(row.results)) : null,
  };
}

/** Picks recorded on the tablets between two dates (inclusive, UTC days), one history order per order reference and day. */
async function recordedHistory(db: Knex, siteId: number, from: string, to: string): Promise<HistoryOrder[]> {
  const start = Date.parse(`${from}T00:00:00Z`);
  const end = Date.parse(`${to}T00:00:00Z`) + DAY_MS;
  if (!(end > start))
    throw new AppError('validation', 'validation_failed', 'The history ends before it starts', [{ field: 'history.to', message: 'must not be before "from"' }]);
  const lines = await recordedPickLines(db, siteId, new Date(start).toISOString(), new Date(end).toISOString());
  const byKey = new Map<string, HistoryOrder>();
  for (const l of lines) {
    const qty = l.picked_qty ?? l.qty;
    if (qty <= 0) continue;
    const day = Math.floor(Date.parse(l.confirmed_at) / DAY_MS);
    const key = `${l.order_ref}\u0000${day}`;
    let o = byKey.get(key);
    if (!o) {
      o = { ref: l.order_ref, day, lines: [] };
      byKey.set(key, o);
    }
    o.lines.push({ sku: l.sku, qty });
  }
  return [...byKey.values()];
}

/**
 * Saves a run and starts it. Everything it needs (plan, SKU master, history, cart) is read and checked
 * first, so a run that is accepted can only fail in the engine.
 */
export async function createRun(deps: Deps, siteId: number, userId: number, body: SlottingInputsBody): Promise<SlottingRunSummary> {
  const inputs = SlottingInputs.parse(body);
  const planId = inputs.planId ?? (await activePlanId(deps.db, siteId));
  if (!planId) throw new AppError('conflict', 'no_active_plan', 'This site has no active floor plan; activate one or choose a stored plan');
  const cart = await getCartProfile(deps.db, siteId, inputs.cartProfileId);
  if (!cart) throw new AppError('validation', 'validation_failed', 'Unknown cart profile', [{ field: 'cartProfileId', message: 'unknown cart profile' }]);
  const history =
    inputs.history.kind === 'recorded'
      ? await recordedHistory(deps.db, siteId, inputs.history.from, inputs.history.to)
      : await getHistory(deps.db, siteId, inputs.history.historyId);
  if (history === null)
    throw new AppError('validation', 'validation_failed', 'Unknown order history', [{ field: 'history.historyId', message: 'upload the history first' }]);
  if (history.length === 0) {
    throw new AppError(
      'unprocessable',
      'empty_history',
      inputs.history.kind === 'recorded'
        ? 'No picks were recorded on this site between those dates; choose other dates or upload an order history'
        : 'The order history holds no orders',
    );
  }
  const plan = await loadPlanIndex(deps.db, planId);
  if (plan.siteId !== siteId)
    throw new AppError('validation', 'validation_failed', 'Unknown floor plan', [{ field: 'planId', message: 'not a plan of this site' }]);
  const site = (await getSiteRow(deps.db, siteId))!;
  const skus = await skuRowsOf(deps.db, siteId);
  if (skus.length === 0) throw new AppError('unprocessable', 'no_skus', 'This site has no SKU master yet; import it first');
  const job: SlottingJobInput = {
    planId,
    geometry: plan.geometry,
    closures: plan.closures,
    depotIndex: 0,
    pinnedBins: inputs.pinnedBins,
    pinnedZones: inputs.pinnedZones,
    skus: skus.map((s) => ({ code: s.sku, bin: s.bin, unitKg: s.unit_weight_kg, unitLitres: s.unit_volume_l })),
    history,
    method: inputs.method,
    maxMoves: inputs.maxMoves,
    weightRule: inputs.weightRule,
    learnShare: inputs.learnShare,
    cart: { totes: cart.totes, maxKg: cart.maxKg, maxLitres: cart.maxLitres },
    walkingMps: site.walking_speed_mps,
    timeLimitMs: SEARCH_BUDGET_MS,
  };
  const id = await insertRun(deps.db, {
    site_id: siteId,
    name: inputs.name,
    method: inputs.method,
    inputs: JSON.stringify(inputs),
    status: 'queued',
    created_by: userId,
    created_at: nowIso(),
  });
  await audit(deps.db, {
    siteId,
    userId,
    action: 'slotting.run',
    subject: `slotting run ${id}`,
    detail: { method: inputs.method, maxMoves: inputs.maxMoves, orders: history.length },
  });
  const record = await deps.jobs.submit(SLOTTING_JOB, { siteId, runId: id, job } satisfies SlottingRunData, { siteId, key: runKey(id) });
  const row = (await getRunRow(deps.db, siteId, id))!;
  return summaryOf(row, liveOf(record));
}

/** The job body of a slotting run, on whichever instance takes it: the search in its own process, then the results saved. */
async function runSlotting(deps: Deps, { siteId, runId: id, job: input }: SlottingRunData, job: JobContext): Promise<null> {
  const row = await getRunRow(deps.db, siteId, id);
  if (!row || (row.status !== 'queued' && row.status !== 'running')) return null;
  await setRun(deps.db, id, { status: 'running' });
  try {
    const results = await runInWorker<SlottingResults, number>(new URL('./slotting.worker.ts', import.meta.url), input, {
      timeoutMs: RUN_TIMEOUT_MS,
      heapMb: 1024,
      signal: job.signal,
      onProgress: (f) => job.progress(f),
    });
    if (job.signal.aborted) return null;
    await setRun(deps.db, id, { status: 'done', results: JSON.stringify(results), finished_at: nowIso() });
  } catch (err) {
    if (job.signal.aborted) throw err;
    deps.logger.warn({ err, slottingRun: id }, 'slotting run failed');
    await setRun(deps.db, id, { status: 'failed', error: runFailure(err), finished_at: nowIso() });
    throw err;
  }
  return null;
}

const runFailure = (err: unknown) => jobStopMessage('The run', err) ?? `The run stopped: ${(err as Error).message}`;

/** Slotting runs as a job kind; one runs at a time per instance (two cores serve every request too). */
export function slottingJob(deps: Deps): JobKind<SlottingRunData, null> {
  return { name: SLOTTING_JOB, run: (data, job) => runSlotting(deps, data, job), describeFailure: runFailure, expireInSeconds: RUN_TIMEOUT_MS / 1000 + 5 * 60 };
}

/** Stops a queued or running run. */
export async function cancelRun(deps: Deps, siteId: number, id: number): Promise<SlottingRunSummary> {
  const row = await getRunRow(deps.db, siteId, id);
  if (!row) throw notFound('Slotting run');
  const job = await runJobOf(deps, id);
  if (!isActive(job)) throw new AppError('conflict', 'not_running', `This run is ${row.status}; only a queued or running run can be cancelled`);
  await deps.jobs.cancel(job!.id);
  await setRun(deps.db, id, { status: 'cancelled', finished_at: nowIso() });
  return summaryOf({ ...row, status: 'cancelled' });
}

/**
 * Reads an uploaded order file as a history (the day of each order is the date of its `due` column,
 * UTC; orders without one count on the upload day). Every SKU must be in the site's SKU master.
 */
export async function uploadHistory(
  deps: Deps,
  siteId: number,
  userId: number,
  file: { buffer: Uint8Array; originalname: string },
): Promise<SlottingHistoryUpload> {
  const read = await readTableFile(file.buffer, file.originalname, 'orders');
  if ('issues' in read) throw new AppError('validation', 'file_unreadable', 'The order history cannot be read', read.issues.slice(0, 50));
  const known = new Set((await skuRowsOf(deps.db, siteId)).map((s) => s.sku));
  const checked = validateOrderRows('orders', read.rows, (sku) => known.has(sku));
  if (checked.errors.length > 0)
    throw new AppError(
      'validation',
      'file_invalid',
      `The order history has ${checked.errors.length} problem(s); nothing was saved`,
      checked.errors.slice(0, 50),
    );
  if (checked.orders.length === 0) throw new AppError('validation', 'file_invalid', 'The order history holds no orders');
  const today = Math.floor(Date.now() / DAY_MS);
  const orders: HistoryOrder[] = checked.orders.map((o) => ({
    ref: o.ref,
    day: o.due === null ? today : Math.floor(Date.parse(o.due) / DAY_MS),
    lines: o.lines,
  }));
  const historyId = await insertHistory(deps.db, {
    site_id: siteId,
    file_name: file.originalname.slice(0, 200),
    orders,
    created_by: userId,
    created_at: nowIso(),
  });
  const days = [...new Set(orders.map((o) => o.day))].sort((a, b) => a - b);
  return {
    historyId,
    orders: orders.length,
    lines: orders.reduce((n, o) => n + o.lines.length, 0),
    days: days.length,
    firstDay: days.length ? dayText(days[0]!) : null,
    lastDay: days.length ? dayText(days[days.length - 1]!) : null,
  };
}

/**
 * Applies a done run's moves (all, or those of the chosen SKUs) to the SKU master in one transaction,
 * audited, each old bin kept in the SKU bin history. Refused while the plan changed since the run, or
 * while unfinished waves still have open lines of a SKU that would move (they name the waves). A move
 * whose SKU has moved since the run, or whose bin would still hold a SKU that is not moving out, is
 * skipped with the reason.
 */
export async function applyRun(deps: Deps, siteId: number, userId: number, id: number, body: SlottingApplyBody): Promise<SlottingApplyResult> {
  const { skus: chosenSkus } = SlottingApplyBody.parse(body);
  const run = await getRun(deps, siteId, id);
  if (!run.results) throw new AppError('conflict', 'run_not_done', 'This run has no results yet');
  if (run.appliedAt) throw new AppError('conflict', 'already_applied', `This run's moves were applied on ${run.appliedAt}`);
  const planId = await activePlanId(deps.db, siteId);
  if (planId !== run.results.planId)
    throw new AppError('conflict', 'plan_changed', 'Another floor plan was activated since this run; start a new run on the active plan');
  const wanted = chosenSkus === null ? run.results.moves : run.results.moves.filter((m) => chosenSkus.includes(m.sku));
  if (wanted.length === 0)
    throw new AppError('validation', 'validation_failed', 'Choose at least one move', [{ field: 'skus', message: 'no move of this run matches' }]);

  const moving = new Set(wanted.map((m) => m.sku));
  const busy = (await openWaveSkus(deps.db, siteId)).filter((r) => moving.has(r.sku));
  if (busy.length > 0) {
    const waves = [...new Set(busy.map((b) => b.wave))];
    throw new AppError(
      'conflict',
      'open_waves',
      `Waves ${waves.join(', ')} still have open lines of ${busy.length} SKU(s) that would move; finish or close them first`,
      {
        waves,
        skus: [...new Set(busy.map((b) => b.sku))].slice(0, 100),
      },
    );
  }

  return deps.db.transaction(async (trx) => {
    const current = new Map((await skuRowsOf(trx, siteId)).map((s) => [s.sku, s.bin]));
    const holders = new Map<string, string[]>();
    for (const [sku, bin] of current) holders.set(bin, [...(holders.get(bin) ?? []), sku]);
    const skipped: { sku: string; reason: string }[] = [];
    const at = nowIso();
    const history: { site_id: number; sku: string; from_bin: string; to_bin: string; source: string; changed_by: number; changed_at: string }[] = [];
    for (const m of wanted) {
      const now = current.get(m.sku);
      if (now === undefined) {
        skipped.push({ sku: m.sku, reason: 'no longer in the SKU master' });
        continue;
      }
      if (m.fromBin !== null && now !== m.fromBin) {
        skipped.push({ sku: m.sku, reason: `moved to ${now} since the run` });
        continue;
      }
      const stays = (holders.get(m.toBin) ?? []).filter((s) => !moving.has(s));
      if (stays.length > 0) {
        skipped.push({ sku: m.sku, reason: `bin ${m.toBin} still holds ${stays.join(', ')}; choose that SKU's move too` });
        continue;
      }
      history.push({ site_id: siteId, sku: m.sku, from_bin: now, to_bin: m.toBin, source: `slotting run ${id}`, changed_by: userId, changed_at: at });
    }
    for (const h of history) await setSkuBin(trx, siteId, h.sku, h.to_bin, at);
    await insertBinHistory(trx, history);
    await setRun(trx, id, { applied_moves: history.length, applied_by: userId, applied_at: at });
    await audit(trx, { siteId, userId, action: 'slotting.apply', subject: `slotting run ${id}`, detail: { applied: history.length, skipped: skipped.length } });
    return { applied: history.length, skipped };
  });
}
