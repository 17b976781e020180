/**
 * The job runner of several instances on one PostgreSQL. The queue is pg-boss's (its own schema): a
 * submitted job is sent to the queue of its kind, and whichever instance's worker fetches it first runs
 * it, one job per kind per instance at a time. State, progress and outcome live in `background_jobs`,
 * so a poll or a cancel on any instance sees the same job; changes and cancels travel as events through
 * the shared hub (LISTEN/NOTIFY).
 *
 * An instance that dies mid-job stops beating: every instance beats for its running jobs every few
 * seconds, and any instance that finds a running job silent for STALE_MS fails its pg-boss job, which
 * pg-boss then retries (retryLimit) on whichever instance fetches it next. pg-boss's own expiry
 * (`expireInSeconds` of the kind) is the backstop.
 */
import { hostname } from 'node:os';
import { randomUUID } from 'node:crypto';
import PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import type { Knex } from 'knex';
import type { EventHub } from '../events/hub';
import { isJobStop } from './spawn';
import { withAdvisoryLock } from '../db/dialect';
import {
  describeJobFailure,
  holdUnlessCancelled,
  isActive,
  testHoldMs,
  JOB_CANCEL,
  JOB_CHANGED,
  KEEP_FINISHED_MS,
  newJobRecord,
  PROGRESS_EVERY_MS,
  type JobContext,
  type JobKind,
  type JobRecord,
  type JobRunner,
  type JobState,
  type SubmitOptions,
} from './jobs';

const BEAT_MS = 3_000;
const STALE_MS = 15_000;
/** pg-boss retries of a job whose instance died (a job that fails by itself is not retried). */
const RETRY_LIMIT = 2;
/** Polling of pg-boss when no wake-up event came (a submit on any instance wakes every worker at once). */
const POLL_SECONDS = 2;
const JOB_SENT = 'job.sent';

interface Row {
  id: string;
  kind: string;
  site_id: number | null;
  key: string | null;
  state: JobState;
  progress: number;
  phase: string | null;
  result: string | null;
  error: string | null;
  instance: string | null;
  attempt: number;
  heartbeat_at: string | null;
  created_at: string;
  started_at: string | null;
  finished_at: string | null;
}

const TABLE = 'background_jobs';
const now = () => new Date().toISOString();

function toRecord<R>(r: Row): JobRecord<R> {
  return {
    id: r.id,
    kind: r.kind,
    siteId: r.site_id === null ? null : Number(r.site_id),
    key: r.key,
    state: r.state,
    progress: Number(r.progress),
    phase: r.phase,
    result: r.result === null ? null : (JSON.parse(r.result) as R),
    error: r.error,
    createdAt: r.created_at,
    startedAt: r.started_at,
    finishedAt: r.finished_at,
  };
}

export interface PgJobRunnerOptions {
  db: Knex;
  /** PostgreSQL URL pg-boss connects to. */
  url: string;
  /** pg-boss's schema (one per app database schema: tests give each test file its own). */
  bossSchema: string;
  events: EventHub;
  logger: Logger;
}

class PgJobRunner implements JobRunner {
  readonly shared = true;
  /** This instance, as recorded on the jobs it runs. */
  readonly instance = `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  private readonly kinds = new Map<string, JobKind<never, unknown>>();
  private readonly workers = new Map<string, string>();
  private readonly running = new Map<string, AbortController>();
  private readonly pending = new Set<Promise<unknown>>();
  private readonly timers: NodeJS.Timeout[] = [];
  private readonly unsubscribe: (() => void)[] = [];
  private closed = false;
  private queues: Promise<unknown> = Promise.resolve();

  constructor(
    private readonly boss: PgBoss,
    private readonly o: PgJobRunnerOptions,
  ) {
    boss.on('error', (err) => o.logger.warn({ err }, 'job queue'));
    this.unsubscribe.push(
      o.events.subscribe(JOB_CANCEL, (id) => {
        if (typeof id === 'string') this.running.get(id)?.abort();
      }),
      o.events.subscribe(JOB_SENT, (kind) => {
        const w = typeof kind === 'string' ? this.workers.get(kind) : undefined;
        if (w) boss.notifyWorker(w);
      }),
    );
    const beat = setInterval(() => void this.beat().catch((err: unknown) => o.logger.warn({ err }, 'job heartbeat')), BEAT_MS);
    const sweep = setInterval(() => void this.takeOverStale().catch((err: unknown) => o.logger.warn({ err }, 'job take-over')), BEAT_MS);
    beat.unref();
    sweep.unref();
    this.timers.push(beat, sweep);
  }

  private get db(): Knex {
    return this.o.db;
  }

  define<D, R>(kind: JobKind<D, R>): void {
    const k = kind as unknown as JobKind<never, unknown>;
    const known = this.kinds.has(k.name);
    this.kinds.set(k.name, k);
    if (known) return;
    // Queues are created one at a time, across instances too: pg-boss's create_queue alters shared
    // tables, and two at once deadlock (seen here with four kinds defined together).
    const created = this.queues.then(() =>
      withAdvisoryLock(this.db, `pg-boss-queues:${this.o.bossSchema}`, async () => {
        if (!(await this.boss.getQueue(k.name)))
          await this.boss.createQueue(k.name, { name: k.name, retryLimit: RETRY_LIMIT, retryDelay: 0, expireInSeconds: k.expireInSeconds });
      }),
    );
    this.queues = created.catch(() => undefined);
    const start = (async () => {
      await created;
      if (this.closed) return;
      const workerId = await this.boss.work<{ data: unknown }>(
        k.name,
        { batchSize: 1, pollingIntervalSeconds: POLL_SECONDS, includeMetadata: true },
        async ([job]) => {
          if (job) await this.execute(job.name, job.id, job.data.data, job.retryCount);
        },
      );
      this.workers.set(k.name, workerId);
    })();
    this.track(start.catch((err: unknown) => this.o.logger.error({ err, kind: k.name }, 'job queue worker did not start')));
    this.ready.push(start.catch(() => undefined));
  }

  /** Resolves once the queues and workers of the kinds defined so far exist. */
  readonly ready: Promise<unknown>[] = [];

  private track(p: Promise<unknown>): void {
    this.pending.add(p);
    void p.finally(() => this.pending.delete(p));
  }

  private async update(id: string, patch: Partial<Row>, states: JobState[] = ['running']): Promise<boolean> {
    const n = await this.db<Row>(TABLE).where({ id }).whereIn('state', states).update(patch);
    return Number(n) > 0;
  }

  private async execute(kindName: string, id: string, data: unknown, attempt: number): Promise<void> {
    const kind = this.kinds.get(kindName);
    if (!kind || this.closed) throw new Error(`job kind ${kindName} is not served here`);
    const abort = new AbortController();
    this.running.set(id, abort);
    const work = (async () => {
      // Taken only while queued (or running on an instance that died): a cancelled job is not started.
      const started = now();
      const took = await this.update(
        id,
        { state: 'running', phase: 'starting', instance: this.instance, attempt, heartbeat_at: started, started_at: started },
        ['queued', 'running'],
      );
      if (!took) return;
      this.o.events.publish(JOB_CHANGED, id);
      let last = 0;
      let writing: Promise<unknown> = Promise.resolve();
      const ctx: JobContext = {
        id,
        signal: abort.signal,
        attempt,
        progress: (fraction, phase) => {
          const t = Date.now();
          if (t - last < PROGRESS_EVERY_MS && phase === undefined) return;
          last = t;
          const patch: Partial<Row> = { progress: Math.max(0, Math.min(1, fraction)), ...(phase !== undefined ? { phase } : {}) };
          writing = writing
            .then(() => this.update(id, patch))
            .then(
              () => this.o.events.publish(JOB_CHANGED, id),
              () => undefined,
            );
        },
      };
      let patch: Partial<Row>;
      try {
        await holdUnlessCancelled(testHoldMs(attempt), abort.signal);
        const result = await kind.run(data as never, ctx);
        patch = { state: 'done', progress: 1, phase: 'done', result: JSON.stringify(result ?? null), finished_at: now() };
      } catch (err) {
        if (abort.signal.aborted) {
          if (!this.closed) return; // cancelled: the canceller wrote the row
          // This instance is stopping: the job goes back to the queue, and pg-boss retries it elsewhere.
          await writing;
          await this.db<Row>(TABLE).where({ id, state: 'running', instance: this.instance }).update({ state: 'queued', phase: 'queued', instance: null });
          this.o.events.publish(JOB_CHANGED, id);
          throw new Error('the instance running this job stopped');
        }
        if (!isJobStop(err)) this.o.logger.warn({ err, job: id, kind: kindName }, 'job failed');
        patch = { state: 'failed', error: describeJobFailure(kind, err), finished_at: now() };
      }
      await writing;
      // Only while this instance still holds it (not cancelled, not taken over meanwhile).
      const n = await this.db<Row>(TABLE).where({ id, state: 'running', instance: this.instance }).update(patch);
      if (Number(n) > 0) this.o.events.publish(JOB_CHANGED, id);
    })();
    this.track(work.catch(() => undefined));
    try {
      await work;
    } finally {
      this.running.delete(id);
    }
  }

  private async beat(): Promise<void> {
    if (this.running.size === 0) return;
    await this.db<Row>(TABLE)
      .whereIn('id', [...this.running.keys()])
      .where({ instance: this.instance, state: 'running' })
      .update({ heartbeat_at: now() });
  }

  /** Running jobs whose instance stopped beating go back to the queue (pg-boss retries them). */
  private async takeOverStale(): Promise<void> {
    const cutoff = new Date(Date.now() - STALE_MS).toISOString();
    const stale = await this.db<Row>(TABLE).where({ state: 'running' }).andWhere('heartbeat_at', '<', cutoff).select('id', 'kind', 'instance');
    for (const s of stale) {
      if (s.instance === this.instance && this.running.has(s.id)) continue;
      // One instance wins the row; only it hands the job back to pg-boss.
      const n = await this.db<Row>(TABLE)
        .where({ id: s.id, state: 'running', instance: s.instance })
        .andWhere('heartbeat_at', '<', cutoff)
        .update({ state: 'queued', phase: 'queued', instance: null });
      if (Number(n) === 0) continue;
      this.o.logger.warn({ job: s.id, kind: s.kind, instance: s.instance }, 'job taken over from a silent instance');
      await this.boss.fail(s.kind, s.id, { message: `instance ${s.instance} stopped beating` });
      this.o.events.publish(JOB_CHANGED, s.id);
      this.o.events.publish(JOB_SENT, s.kind);
    }
  }

  async submit(kindName: string, data: unknown, options: SubmitOptions = {}): Promise<JobRecord> {
    const kind = this.kinds.get(kindName);
    if (!kind) throw new Error(`unknown job kind ${kindName}`);
    await Promise.all(this.ready);
    await this.db<Row>(TABLE)
      .whereNotNull('finished_at')
      .andWhere('finished_at', '<', new Date(Date.now() - KEEP_FINISHED_MS).toISOString())
      .delete();
    const r = newJobRecord(kindName, options);
    const row: Row = {
      id: r.id,
      kind: r.kind,
      site_id: r.siteId,
      key: r.key,
      state: r.state,
      progress: r.progress,
      phase: r.phase,
      result: null,
      error: null,
      instance: null,
      attempt: 0,
      heartbeat_at: null,
      created_at: r.createdAt,
      started_at: null,
      finished_at: null,
    };
    await this.db(TABLE).insert(row);
    await this.boss.send(kindName, { data: data as object }, { id: row.id, retryLimit: RETRY_LIMIT, retryDelay: 0, expireInSeconds: kind.expireInSeconds });
    this.o.events.publish(JOB_SENT, kindName);
    return toRecord(row);
  }

  async get<R>(id: string): Promise<JobRecord<R> | null> {
    const r = await this.db<Row>(TABLE).where({ id }).first();
    return r ? toRecord<R>(r) : null;
  }

  async latest<R>(key: string): Promise<JobRecord<R> | null> {
    const r = await this.db<Row>(TABLE).where({ key }).orderBy('created_at', 'desc').first();
    return r ? toRecord<R>(r) : null;
  }

  async cancel(id: string): Promise<JobRecord | null> {
    const r = await this.db<Row>(TABLE).where({ id }).first();
    if (!r) return null;
    if (isActive(r)) {
      await this.update(id, { state: 'cancelled', phase: 'cancelled', finished_at: now() }, ['queued', 'running']);
      this.running.get(id)?.abort();
      this.o.events.publish(JOB_CANCEL, id);
      this.o.events.publish(JOB_CHANGED, id);
      await this.boss.cancel(r.kind, id).catch(() => undefined);
    }
    return this.get(id);
  }

  watch(id: string, onChange: () => void): () => void {
    return this.o.events.subscribe(JOB_CHANGED, (payload) => {
      if (payload === id) onChange();
    });
  }

  async settled(): Promise<void> {
    while (this.pending.size > 0) await Promise.all([...this.pending]);
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const t of this.timers) clearInterval(t);
    for (const u of this.unsubscribe) u();
    for (const a of this.running.values()) a.abort();
    await Promise.all(this.ready);
    await this.settled().catch(() => undefined);
    // Graceful: the workers hand their jobs back (fail → retry) before the connections close.
    await this.boss.stop({ graceful: true, close: true, wait: true, timeout: 5_000 });
  }
}

/** Starts pg-boss (it creates or upgrades its schema at first start) and answers the runner. */
export async function createPgJobRunner(o: PgJobRunnerOptions): Promise<JobRunner> {
  const boss = new PgBoss({ connectionString: o.url, schema: o.bossSchema, max: 4, application_name: 'aislewright-jobs', schedule: false });
  // Instances starting together would race creating pg-boss's schema: one at a time.
  await withAdvisoryLock(o.db, `pg-boss-start:${o.bossSchema}`, () => boss.start());
  return new PgJobRunner(boss, o);
}
