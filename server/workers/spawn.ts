/**
 * Heavy work (studies, wave planning, plan builds, imports) runs in a separate process per job. A V8
 * fatal error or an out-of-memory stop in a worker thread ends the whole server process (measured
 * here: a `Worker` with a 256 MB heap cap filling a 169-million-element array aborted the main process
 * too); in a child process it ends only that job, and the server answers with a message.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { CRASH_TEST_ENV, type JobMessage } from './worker-protocol';

const BOOT = fileURLToPath(new URL('./job-boot.mjs', import.meta.url));
/**
 * Typed arrays live outside the V8 heap, so --max-old-space-size does not bound them: the process's
 * resident memory is watched too (Linux /proc), and a job past twice its heap cap plus this is stopped.
 */
const OFF_HEAP_ALLOWANCE_MB = 256;
const RSS_CHECK_MS = 500;

/** Resident memory of a process in MiB, or null where /proc is not available. */
function residentMb(pid: number | undefined): number | null {
  if (pid === undefined) return null;
  try {
    const pages = Number(readFileSync(`/proc/${pid}/statm`, 'utf8').split(' ')[1]);
    return Number.isFinite(pages) ? (pages * 4096) / (1024 * 1024) : null;
  } catch {
    return null;
  }
}

/** Enough of a dying process's stderr to tell an out-of-memory stop from another fatal error. */
const STDERR_KEEP = 8192;

export interface WorkerRunOptions<P> {
  /** The job's process is killed after this long and the promise rejects with WorkerTimeoutError. */
  timeoutMs: number;
  /** Old-generation heap cap of the job's process in MiB (--max-old-space-size). */
  heapMb: number;
  onProgress?: (progress: P) => void;
  /** Aborting kills the job's process; the promise rejects with WorkerCancelledError. */
  signal?: AbortSignal;
}

export class WorkerTimeoutError extends Error {
  constructor(ms: number) {
    super(`did not finish within ${formatMs(ms)} and was stopped`);
    this.name = 'WorkerTimeoutError';
  }
}

export class WorkerOutOfMemoryError extends Error {
  constructor(mb: number) {
    super(`needed more than ${mb} MiB of memory and was stopped`);
    this.name = 'WorkerOutOfMemoryError';
  }
}

/** The job's process died without answering (a fatal engine error, a signal, an exit). */
export class WorkerCrashError extends Error {
  constructor(detail: string) {
    super(`stopped with a fatal error (${detail})`);
    this.name = 'WorkerCrashError';
  }
}

export class WorkerCancelledError extends Error {
  constructor() {
    super('was cancelled');
    this.name = 'WorkerCancelledError';
  }
}

/** Errors whose message completes a sentence about the job: `${subject} ${message}`. */
export type JobStopError = WorkerTimeoutError | WorkerOutOfMemoryError | WorkerCrashError | WorkerCancelledError;

export function isJobStop(err: unknown): err is JobStopError {
  return err instanceof WorkerTimeoutError || err instanceof WorkerOutOfMemoryError || err instanceof WorkerCrashError || err instanceof WorkerCancelledError;
}

/**
 * What the user reads when a job's process stopped, e.g. "The study needed more than 1536 MiB of
 * memory and was stopped". Null for any other error.
 */
export function jobStopMessage(subject: string, err: unknown): string | null {
  return isJobStop(err) ? `${subject} ${err.message}` : null;
}

function formatMs(ms: number): string {
  return ms >= 120_000 ? `${Math.round(ms / 60_000)} minutes` : `${Math.round(ms / 1000)} s`;
}

/** The line of a fatal error report that names it, e.g. "Fatal JavaScript invalid size error 169220804". */
function fatalLine(stderr: string): string | null {
  const line = stderr
    .split('\n')
    .map((l) => l.replace(/^#\s*/, '').trim())
    .find((l) => /fatal|error/i.test(l) && !/^FailureMessage/.test(l));
  return line ? line.slice(0, 200) : null;
}

interface JobProcess {
  child: ChildProcess;
  /** Resolves when the job module has loaded and waits for its job. */
  ready: Promise<void>;
  stderr: () => string;
}

/** Forks `node job-boot.mjs <module>` with the heap cap; the process waits, unreferenced, for one job. */
function forkJobProcess(moduleUrl: URL, heapMb: number): JobProcess {
  const child = fork(BOOT, [moduleUrl.href], {
    execArgv: [`--max-old-space-size=${heapMb}`],
    serialization: 'advanced',
    stdio: ['ignore', 'inherit', 'pipe', 'ipc'],
  });
  let stderr = '';
  child.stderr?.setEncoding('utf8');
  child.stderr?.on('data', (chunk: string) => {
    stderr = (stderr + chunk).slice(-STDERR_KEEP);
  });
  const ready = new Promise<void>((resolve, reject) => {
    const onMessage = (msg: JobMessage<unknown, unknown>) => {
      if (msg.type !== 'ready') return;
      child.off('message', onMessage);
      resolve();
    };
    child.on('message', onMessage);
    child.once('close', () => reject(new Error('the job process ended before it was ready')));
  });
  ready.catch(() => undefined);
  setReferenced(child, false);
  return { child, ready, stderr: () => stderr };
}

/** An unreferenced process (and its pipes) does not keep the server, a CLI run or a test alive. */
function setReferenced(child: ChildProcess, on: boolean): void {
  const handles = [child, child.channel, child.stderr] as ({ ref(): void; unref(): void } | null | undefined)[];
  for (const h of handles) {
    if (!h) continue;
    if (on) h.ref();
    else h.unref();
  }
}

/**
 * Start-up of a job process (node + tsx's loader + the module) costs about a second or two of CPU
 * here, so after each job one spare process per job module and heap cap is started and left waiting;
 * the next job of that kind takes it at once. Each spare still serves one job only (a fresh process
 * per job), and an idle spare exits after SPARE_IDLE_MS. These are operating-system processes of this
 * server process, so they are kept here rather than per app.
 */
const spares = new Map<string, { proc: JobProcess; idle: NodeJS.Timeout }>();
const SPARE_IDLE_MS = 10 * 60_000;

function takeProcess(moduleUrl: URL, heapMb: number): JobProcess {
  const key = `${heapMb}:${moduleUrl.href}`;
  const spare = spares.get(key);
  spares.delete(key);
  if (spare) {
    clearTimeout(spare.idle);
    if (spare.proc.child.connected && spare.proc.child.exitCode === null) return spare.proc;
    spare.proc.child.kill('SIGKILL');
  }
  return forkJobProcess(moduleUrl, heapMb);
}

function keepSpare(moduleUrl: URL, heapMb: number): void {
  const key = `${heapMb}:${moduleUrl.href}`;
  if (spares.has(key)) return;
  const proc = forkJobProcess(moduleUrl, heapMb);
  const idle = setTimeout(() => {
    if (spares.get(key)?.proc === proc) spares.delete(key);
    proc.child.kill('SIGKILL');
  }, SPARE_IDLE_MS);
  idle.unref();
  spares.set(key, { proc, idle });
  proc.child.once('close', () => {
    if (spares.get(key)?.proc === proc) {
      clearTimeout(idle);
      spares.delete(key);
    }
  });
}

/** What the job process is sent: the job's data, and the test-only crash request of the server's environment. */
export interface JobEnvelope<D> {
  data: D;
  crashTest: string | null;
}

/**
 * Runs one job in its own process (a waiting spare, or a fresh fork), capped at `heapMb` and
 * `timeoutMs`. The module calls `serveJob`: it takes `data` (structured clone: typed arrays and Maps
 * pass), posts progress any number of times, then its result or error, and exits. Whatever kills
 * that process — a fatal engine error, running out of memory, a signal — cannot reach the server.
 * Rejects with WorkerTimeoutError, WorkerOutOfMemoryError, WorkerCrashError, WorkerCancelledError,
 * or Error with the job's own message when the job threw.
 */
export function runInWorker<R, P = unknown>(moduleUrl: URL, data: unknown, options: WorkerRunOptions<P>): Promise<R> {
  return new Promise<R>((resolve, reject) => {
    if (options.signal?.aborted) return reject(new WorkerCancelledError());
    const heapMb = Math.max(16, Math.round(options.heapMb));
    const proc = takeProcess(moduleUrl, heapMb);
    const { child } = proc;
    setReferenced(child, true);
    let settled = false;
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      clearInterval(watch);
      options.signal?.removeEventListener('abort', onAbort);
      child.off('message', onMessage);
      fn();
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
      keepSpare(moduleUrl, heapMb);
    };
    const onAbort = () => finish(() => reject(new WorkerCancelledError()));
    options.signal?.addEventListener('abort', onAbort, { once: true });
    const timer = setTimeout(() => finish(() => reject(new WorkerTimeoutError(options.timeoutMs))), options.timeoutMs);
    const rssCapMb = 2 * heapMb + OFF_HEAP_ALLOWANCE_MB;
    const watch = setInterval(() => {
      const mb = residentMb(child.pid);
      if (mb !== null && mb > rssCapMb) finish(() => reject(new WorkerOutOfMemoryError(rssCapMb)));
    }, RSS_CHECK_MS);
    watch.unref();
    const onMessage = (msg: JobMessage<P, R>) => {
      if (msg.type === 'progress') options.onProgress?.(msg.progress);
      else if (msg.type === 'result') finish(() => resolve(msg.result));
      else if (msg.type === 'error') finish(() => reject(new Error(msg.message)));
    };
    child.on('message', onMessage);
    child.on('error', (err) => finish(() => reject(err)));
    // 'close' rather than 'exit': stderr has been read to its end, so the cause is in hand.
    child.on('close', (code, signal) =>
      finish(() => {
        const stderr = proc.stderr();
        if (/heap out of memory|Allocation failed/i.test(stderr)) return reject(new WorkerOutOfMemoryError(heapMb));
        const how = signal ? `signal ${signal}` : `exit code ${code}`;
        const line = fatalLine(stderr);
        reject(new WorkerCrashError(line ? `${line}; ${how}` : how));
      }),
    );
    const crashTest = process.env.NODE_ENV === 'test' ? (process.env[CRASH_TEST_ENV] ?? null) : null;
    proc.ready.then(
      () => child.send({ data, crashTest } satisfies JobEnvelope<unknown>, (err) => err && finish(() => reject(err))),
      () => undefined, // 'close' above tells why
    );
  });
}
