/**
 * Floor-plan build jobs (upload check-and-build, generate) as jobs of the app's job runner
 * (server/workers/jobs.ts): one at a time per instance, each readable by polling or as a stream of
 * updates, on any instance when several share PostgreSQL. A job is forgotten an hour after it ends.
 */
import type { FloorPlanJob, GeneratePlanParams, JobPhase } from '../../shared/floor-plans';
import { JobPhase as JobPhaseSchema } from '../../shared/floor-plans';
import type { RowIssue } from '../../shared/imports';
import type { Deps } from '../deps';
import { AppError } from '../http/errors';
import { isActive, type JobRecord } from '../workers/jobs';

export const FLOOR_PLAN_BUILD_JOB = 'floor-plan-build';

export type JobOutcome =
  { status: 'done'; planId: number; warnings: RowIssue[] } | { status: 'invalid'; errors: RowIssue[]; warnings: RowIssue[]; message: string };

export interface JobControl {
  progress(phase: JobPhase, fraction: number): void;
  /** Aborted when a user cancels the job: stops the build's process and the save. */
  signal: AbortSignal;
}

/** What a build job is given (JSON: it may travel to another instance; an upload's bytes as base64). */
export type BuildJobData =
  | { kind: 'upload'; siteId: number; userId: number; bytes: string; filename: string; name?: string }
  | { kind: 'generate'; siteId: number; userId: number; name: string; params: GeneratePlanParams };

/** The job's key tells its kind (the record carries no data). */
const keyOf = (kind: FloorPlanJob['kind']) => `floor-plan-${kind}`;

function toFloorPlanJob(r: JobRecord<JobOutcome>): FloorPlanJob {
  const out = r.state === 'done' ? r.result : null;
  const phase = JobPhaseSchema.safeParse(r.phase);
  const finishedAt = isActive(r) ? null : (r.finishedAt ?? new Date().toISOString());
  return {
    id: r.id,
    siteId: r.siteId ?? 0,
    kind: r.key === keyOf('upload') ? 'upload' : 'generate',
    status: isActive(r) ? 'running' : out ? out.status : r.state === 'cancelled' ? 'cancelled' : 'failed',
    phase: out?.status === 'done' ? 'done' : phase.success ? phase.data : 'queued',
    fraction: out?.status === 'done' ? 1 : Math.max(0, Math.min(1, r.progress)),
    message:
      out?.status === 'invalid'
        ? out.message
        : r.state === 'cancelled'
          ? 'The build was cancelled; nothing was saved'
          : r.state === 'failed'
            ? (r.error ?? 'The build failed')
            : null,
    planId: out?.status === 'done' ? out.planId : null,
    errors: out?.status === 'invalid' ? out.errors : [],
    warnings: out?.warnings ?? [],
    createdAt: r.createdAt,
    finishedAt,
    totalMs: finishedAt ? Math.max(0, Date.parse(finishedAt) - Date.parse(r.createdAt)) : null,
  };
}

/** Submits a build job; it waits behind any build running on the instance that takes it. */
export async function startJob(deps: Deps, data: BuildJobData): Promise<FloorPlanJob> {
  const r = await deps.jobs.submit(FLOOR_PLAN_BUILD_JOB, data, { siteId: data.siteId, key: keyOf(data.kind) });
  return toFloorPlanJob(r as JobRecord<JobOutcome>);
}

/** The job as it stands, or undefined when unknown, forgotten, or of another site. */
export async function getJob(deps: Deps, siteId: number, id: string): Promise<FloorPlanJob | undefined> {
  const r = await deps.jobs.get<JobOutcome>(id);
  return r && r.kind === FLOOR_PLAN_BUILD_JOB && r.siteId === siteId ? toFloorPlanJob(r) : undefined;
}

/**
 * Cancels a queued or running build (on whichever instance runs it): its process is stopped and any
 * half-saved plan deleted. Undefined when the job is unknown or of another site; 409 once it has ended.
 */
export async function cancelJob(deps: Deps, siteId: number, id: string): Promise<FloorPlanJob | undefined> {
  const job = await getJob(deps, siteId, id);
  if (!job) return undefined;
  if (job.finishedAt) throw new AppError('conflict', 'not_running', `This build has ended (${job.status}); only a running build can be cancelled`);
  const r = await deps.jobs.cancel(id);
  return r ? toFloorPlanJob(r as JobRecord<JobOutcome>) : job;
}

/** Calls `onUpdate` on every change until the job ends, then `onEnd` once; returns the unsubscribe function. */
export function watchJob(deps: Deps, siteId: number, id: string, onUpdate: (job: FloorPlanJob) => void, onEnd: (job: FloorPlanJob) => void): () => void {
  let ended = false;
  let reading: Promise<unknown> = Promise.resolve();
  const check = () => {
    reading = reading
      .then(async () => {
        if (ended) return;
        const j = await getJob(deps, siteId, id);
        if (!j || ended) return;
        if (j.finishedAt) {
          ended = true;
          stop();
          onEnd(j);
        } else onUpdate(j);
      })
      .catch(() => undefined);
  };
  const stop = deps.jobs.watch(id, check);
  // A change made before the watch began is read once now.
  check();
  return () => {
    ended = true;
    stop();
  };
}

/** Resolves when the job ends (tests, the seeder). */
export async function whenJobEnds(deps: Deps, siteId: number, id: string): Promise<FloorPlanJob> {
  for (;;) {
    const j = await getJob(deps, siteId, id);
    if (!j) throw new Error(`unknown job ${id}`);
    if (j.finishedAt) return j;
    await new Promise((r) => setTimeout(r, 100));
  }
}
