/**
 * Floor-plan build jobs: in memory, one at a time (the machine has two cores shared by everyone),
 * each readable by polling or as a stream of updates. A job is forgotten an hour after it ends.
 */
import { EventEmitter } from 'node:events';
import { randomUUID } from 'node:crypto';
import type { FloorPlanJob, JobPhase } from '../../shared/floor-plans';
import type { RowIssue } from '../../shared/imports';

const KEEP_FINISHED_MS = 60 * 60_000;
/** Progress events closer together than this are merged (a poll or SSE client needs no more). */
const PROGRESS_EVERY_MS = 100;

export type JobOutcome =
  | { status: 'done'; planId: number; warnings: RowIssue[] }
  | { status: 'invalid'; errors: RowIssue[]; warnings: RowIssue[]; message: string };

interface JobEntry {
  job: FloorPlanJob;
  started: number;
  lastEmit: number;
  events: EventEmitter;
}

export interface JobControl {
  progress(phase: JobPhase, fraction: number): void;
}

const jobs = new Map<string, JobEntry>();
let queue: Promise<unknown> = Promise.resolve();

function emit(entry: JobEntry, force: boolean): void {
  const now = Date.now();
  if (!force && now - entry.lastEmit < PROGRESS_EVERY_MS) return;
  entry.lastEmit = now;
  entry.events.emit('update', entry.job);
}

function sweep(): void {
  const cutoff = Date.now() - KEEP_FINISHED_MS;
  for (const [id, e] of jobs) if (e.job.finishedAt && Date.parse(e.job.finishedAt) < cutoff) jobs.delete(id);
}

/**
 * Registers a job and queues `work` behind any running one. `work` reports progress through the
 * control and resolves to its outcome; a throw marks the job failed with the error's message.
 */
export function startJob(
  siteId: number,
  kind: FloorPlanJob['kind'],
  work: (control: JobControl) => Promise<JobOutcome>,
  describeFailure: (err: unknown) => string,
): FloorPlanJob {
  sweep();
  const job: FloorPlanJob = {
    id: randomUUID(),
    siteId,
    kind,
    status: 'running',
    phase: 'queued',
    fraction: 0,
    message: null,
    planId: null,
    errors: [],
    warnings: [],
    createdAt: new Date().toISOString(),
    finishedAt: null,
    totalMs: null,
  };
  const entry: JobEntry = { job, started: performance.now(), lastEmit: 0, events: new EventEmitter() };
  entry.events.setMaxListeners(50);
  jobs.set(job.id, entry);
  const control: JobControl = {
    progress(phase, fraction) {
      const changed = phase !== job.phase;
      job.phase = phase;
      job.fraction = Math.max(0, Math.min(1, fraction));
      emit(entry, changed);
    },
  };
  const finish = (patch: Partial<FloorPlanJob>) => {
    Object.assign(job, patch, { finishedAt: new Date().toISOString(), totalMs: Math.round(performance.now() - entry.started) });
    emit(entry, true);
    entry.events.emit('end', job);
  };
  const run = queue.then(() => work(control));
  queue = run.catch(() => undefined);
  run.then(
    (outcome) => {
      if (outcome.status === 'done') finish({ status: 'done', phase: 'done', fraction: 1, planId: outcome.planId, warnings: outcome.warnings });
      else finish({ status: 'invalid', errors: outcome.errors, warnings: outcome.warnings, message: outcome.message });
    },
    (err: unknown) => finish({ status: 'failed', message: describeFailure(err) }),
  );
  return { ...job };
}

/** The job as it stands, or undefined when unknown, forgotten, or of another site. */
export function getJob(siteId: number, id: string): FloorPlanJob | undefined {
  const e = jobs.get(id);
  return e && e.job.siteId === siteId ? { ...e.job } : undefined;
}

/** Calls `onUpdate` on every change until the job ends; returns the unsubscribe function. */
export function watchJob(siteId: number, id: string, onUpdate: (job: FloorPlanJob) => void, onEnd: (job: FloorPlanJob) => void): (() => void) | null {
  const e = jobs.get(id);
  if (!e || e.job.siteId !== siteId) return null;
  const update = (j: FloorPlanJob) => onUpdate({ ...j });
  const end = (j: FloorPlanJob) => onEnd({ ...j });
  e.events.on('update', update);
  e.events.on('end', end);
  return () => {
    e.events.off('update', update);
    e.events.off('end', end);
  };
}

/** Resolves when the job ends (tests, the seeder). */
export function whenJobEnds(siteId: number, id: string): Promise<FloorPlanJob> {
  return new Promise((resolve, reject) => {
    const now = getJob(siteId, id);
    if (!now) return reject(new Error(`unknown job ${id}`));
    if (now.finishedAt) return resolve(now);
    const stop = watchJob(siteId, id, () => undefined, (j) => {
      stop?.();
      resolve(j);
    });
  });
}
