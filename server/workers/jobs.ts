/**
 * The one job runner of an app: heavy jobs (wave previews, studies, slotting runs, plan builds) are
 * submitted by kind, run one at a time per kind (two cores serve every request too), report progress,
 * and can be cancelled. The work itself runs in a job process of its own (`runInWorker`, spawn.ts).
 *
 * - One SQLite process: `createLocalJobRunner` keeps jobs in memory and runs them in this process.
 * - Several instances on PostgreSQL: `createPgJobRunner` (pg-jobs.ts) queues them in pg-boss and keeps
 *   state and progress in the `background_jobs` table, so any instance runs, answers or cancels a job.
 *
 * A job's data must be JSON (it goes through PostgreSQL on the shared runner); its result too.
 */
import { randomUUID } from 'node:crypto';
import type { Logger } from 'pino';
import type { EventHub } from '../events/hub';
import { isJobStop, WorkerCancelledError } from './spawn';

export type JobState = 'queued' | 'running' | 'done' | 'failed' | 'cancelled';

export interface JobRecord<R = unknown> {
  id: string;
  kind: string;
  siteId: number | null;
  key: string | null;
  state: JobState;
  progress: number;
  phase: string | null;
  result: R | null;
  /** Words for the user when the job failed. */
  error: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export interface JobContext {
  id: string;
  /** Aborted when the job is cancelled (on any instance): pass it to runInWorker. */
  signal: AbortSignal;
  /** 0 on the first attempt; 1… when another instance took the job over. */
  attempt: number;
  progress(fraction: number, phase?: string | null): void;
}

export interface JobKind<D = never, R = unknown> {
  name: string;
  run(data: D, ctx: JobContext): Promise<R>;
  /** The user's words for a failure; default: the job-stop message or the error's own message. */
  describeFailure?(err: unknown): string;
  /**
   * Shared runner only: a job still running this long after it started is given up by pg-boss and run
   * again elsewhere (a backstop; a dead instance's jobs are taken over sooner, see pg-jobs.ts).
   */
  expireInSeconds: number;
}

export interface SubmitOptions {
  siteId?: number | null;
  key?: string | null;
}

export interface JobRunner {
  /** True when jobs are shared by several instances (PostgreSQL). */
  readonly shared: boolean;
  /** Registers (or replaces) a kind; createApp registers every kind (server/workers/job-kinds.ts). */
  define<D, R>(kind: JobKind<D, R>): void;
  submit(kind: string, data: unknown, options?: SubmitOptions): Promise<JobRecord>;
  get<R = unknown>(id: string): Promise<JobRecord<R> | null>;
  /** The newest job submitted with this key. */
  latest<R = unknown>(key: string): Promise<JobRecord<R> | null>;
  /** Cancels a queued or running job; answers the job as it now stands (null when unknown). */
  cancel(id: string): Promise<JobRecord | null>;
  /** Calls `onChange` after each change of the job (progress, end), on whichever instance it runs. */
  watch(id: string, onChange: () => void): () => void;
  /** Resolves once every job this runner started so far has ended (tests, shutdown). */
  settled(): Promise<void>;
  close(): Promise<void>;
}

/** Hub topics: a job changed (payload: its id); a job was cancelled (payload: its id). */
export const JOB_CHANGED = 'job.changed';
export const JOB_CANCEL = 'job.cancel';
/** Finished jobs are forgotten after an hour (a preview is kept that long for its release). */
export const KEEP_FINISHED_MS = 60 * 60_000;
/** Progress changes closer together than this are merged (a poll or a stream needs no more). */
export const PROGRESS_EVERY_MS = 200;

export const isActive = (r: Pick<JobRecord, 'state'> | null | undefined): boolean => r?.state === 'queued' || r?.state === 'running';

export function describeJobFailure(kind: JobKind<never, unknown>, err: unknown): string {
  if (kind.describeFailure) return kind.describeFailure(err);
  return err instanceof Error ? err.message : String(err);
}

/** Test-only (NODE_ENV=test): holds a job's first attempt this many ms, so a test can stop its instance mid-job. */
export const HOLD_FIRST_ATTEMPT_TEST_ENV = 'AISLEWRIGHT_TEST_JOB_HOLD_MS';

export function testHoldMs(attempt: number): number {
  if (process.env.NODE_ENV !== 'test' || attempt > 0) return 0;
  const ms = Number(process.env[HOLD_FIRST_ATTEMPT_TEST_ENV] ?? 0);
  return Number.isFinite(ms) && ms > 0 ? ms : 0;
}

/** Waits `ms`, or rejects with WorkerCancelledError as soon as the signal aborts. */
export function holdUnlessCancelled(ms: number, signal: AbortSignal): Promise<void> {
  if (ms <= 0) return Promise.resolve();
  return new Promise((resolve, reject) => {
    if (signal.aborted) return reject(new WorkerCancelledError());
    const t = setTimeout(() => {
      signal.removeEventListener('abort', onAbort);
      resolve();
    }, ms);
    const onAbort = () => {
      clearTimeout(t);
      reject(new WorkerCancelledError());
    };
    signal.addEventListener('abort', onAbort, { once: true });
  });
}

/** A job as submitted: queued, no progress, no result yet. */
export function newJobRecord(kind: string, options: SubmitOptions): JobRecord {
  return {
    id: randomUUID(),
    kind,
    siteId: options.siteId ?? null,
    key: options.key ?? null,
    state: 'queued',
    progress: 0,
    phase: 'queued',
    result: null,
    error: null,
    createdAt: new Date().toISOString(),
    startedAt: null,
    finishedAt: null,
  };
}

interface LocalEntry {
  record: JobRecord;
  data: unknown;
  abort: AbortController;
  lastEmit: number;
}

/** Jobs of one process, in memory: one lane per kind, each running its jobs one at a time. */
class LocalJobRunner implements JobRunner {
  readonly shared = false;
  private readonly kinds = new Map<string, JobKind<never, unknown>>();
  private readonly entries = new Map<string, LocalEntry>();
  private readonly lanes = new Map<string, Promise<unknown>>();
  private readonly pending = new Set<Promise<unknown>>();

  constructor(
    private readonly events: EventHub,
    private readonly logger: Logger,
  ) {}

  define<D, R>(kind: JobKind<D, R>): void {
    this.kinds.set(kind.name, kind as unknown as JobKind<never, unknown>);
  }

  private sweep(): void {
    const cutoff = Date.now() - KEEP_FINISHED_MS;
    for (const [id, e] of this.entries) if (e.record.finishedAt && Date.parse(e.record.finishedAt) < cutoff) this.entries.delete(id);
  }

  private changed(e: LocalEntry, force: boolean): void {
    const now = Date.now();
    if (!force && now - e.lastEmit < PROGRESS_EVERY_MS) return;
    e.lastEmit = now;
    this.events.publish(JOB_CHANGED, e.record.id);
  }

  async submit(kindName: string, data: unknown, options: SubmitOptions = {}): Promise<JobRecord> {
    const kind = this.kinds.get(kindName);
    if (!kind) throw new Error(`unknown job kind ${kindName}`);
    this.sweep();
    const record = newJobRecord(kindName, options);
    const entry: LocalEntry = { record, data, abort: new AbortController(), lastEmit: 0 };
    this.entries.set(record.id, entry);
    const lane = this.lanes.get(kindName) ?? Promise.resolve();
    const run = lane.then(() => this.execute(kind, entry));
    const tail = run.catch((err: unknown) => this.logger.error({ err, job: record.id }, 'job bookkeeping failed'));
    this.lanes.set(kindName, tail);
    this.pending.add(tail);
    void tail.finally(() => this.pending.delete(tail));
    return { ...record };
  }

  private async execute(kind: JobKind<never, unknown>, e: LocalEntry): Promise<void> {
    const r = e.record;
    if (r.state !== 'queued') return;
    Object.assign(r, { state: 'running', phase: 'starting', startedAt: new Date().toISOString() });
    this.changed(e, true);
    const ctx: JobContext = {
      id: r.id,
      signal: e.abort.signal,
      attempt: 0,
      progress: (fraction, phase) => {
        if (r.state !== 'running') return;
        const phaseChanged = phase !== undefined && phase !== r.phase;
        r.progress = Math.max(0, Math.min(1, fraction));
        if (phase !== undefined) r.phase = phase;
        this.changed(e, phaseChanged);
      },
    };
    try {
      await holdUnlessCancelled(testHoldMs(0), e.abort.signal);
      const result = await kind.run(e.data as never, ctx);
      if ((r.state as JobState) !== 'running') return;
      Object.assign(r, { state: 'done', progress: 1, phase: 'done', result: result ?? null, finishedAt: new Date().toISOString() });
    } catch (err) {
      if ((r.state as JobState) !== 'running') return;
      if (!isJobStop(err) && !(err instanceof Error && 'kind' in err)) this.logger.warn({ err, job: r.id, kind: r.kind }, 'job failed');
      Object.assign(r, { state: 'failed', error: describeJobFailure(kind, err), finishedAt: new Date().toISOString() });
    } finally {
      e.data = null;
      this.changed(e, true);
    }
  }

  async get<R>(id: string): Promise<JobRecord<R> | null> {
    const e = this.entries.get(id);
    return e ? ({ ...e.record } as JobRecord<R>) : null;
  }

  async latest<R>(key: string): Promise<JobRecord<R> | null> {
    let best: JobRecord | null = null;
    for (const e of this.entries.values()) if (e.record.key === key && (!best || e.record.createdAt >= best.createdAt)) best = e.record;
    return best ? ({ ...best } as JobRecord<R>) : null;
  }

  async cancel(id: string): Promise<JobRecord | null> {
    const e = this.entries.get(id);
    if (!e) return null;
    if (isActive(e.record)) {
      Object.assign(e.record, { state: 'cancelled', phase: 'cancelled', finishedAt: new Date().toISOString() });
      e.abort.abort();
      this.changed(e, true);
    }
    return { ...e.record };
  }

  watch(id: string, onChange: () => void): () => void {
    return this.events.subscribe(JOB_CHANGED, (payload) => {
      if (payload === id) onChange();
    });
  }

  async settled(): Promise<void> {
    while (this.pending.size > 0) await Promise.all([...this.pending]);
  }

  async close(): Promise<void> {
    for (const e of this.entries.values()) if (isActive(e.record)) await this.cancel(e.record.id);
    await this.settled();
  }
}

export function createLocalJobRunner(events: EventHub, logger: Logger): JobRunner {
  return new LocalJobRunner(events, logger);
}

/** Resolves with the job once it has ended (tests, the seeder). */
export function whenJobEnds<R>(jobs: JobRunner, id: string): Promise<JobRecord<R>> {
  return new Promise((resolve, reject) => {
    let done = false;
    const check = async () => {
      if (done) return;
      const r = await jobs.get<R>(id);
      if (!r) {
        done = true;
        stop();
        clearInterval(poll);
        return reject(new Error(`unknown job ${id}`));
      }
      if (!isActive(r)) {
        done = true;
        stop();
        clearInterval(poll);
        resolve(r);
      }
    };
    const stop = jobs.watch(id, () => void check());
    // A change published before the watch began is caught by the poll.
    const poll = setInterval(() => void check(), 500);
    void check();
  });
}
