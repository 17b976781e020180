import { Worker, type ResourceLimits } from 'node:worker_threads';

/**
 * Starts a worker thread running a TypeScript module. The worker registers tsx's loader first, so
 * the same code runs under `node --import tsx`, the CLI and Vitest alike.
 */
export function spawnTsWorker(moduleUrl: URL, workerData: unknown, resourceLimits?: ResourceLimits): Worker {
  const boot = `
    const { workerData } = require('node:worker_threads');
    import('tsx/esm/api').then((tsx) => { tsx.register(); return import(workerData.__module); });
  `;
  return new Worker(boot, {
    eval: true,
    workerData: { ...(workerData as object), __module: moduleUrl.href },
    ...(resourceLimits ? { resourceLimits } : {}),
  });
}

export interface WorkerRunOptions<P> {
  /** The worker is terminated after this long and the promise rejects with a TimeoutError. */
  timeoutMs: number;
  resourceLimits?: ResourceLimits;
  onProgress?: (progress: P) => void;
}

export class WorkerTimeoutError extends Error {
  constructor(ms: number) {
    super(`worker stopped after ${ms} ms`);
    this.name = 'WorkerTimeoutError';
  }
}

/**
 * Runs one job in a fresh worker: the worker posts `{ type: 'progress', progress }` any number of
 * times, then `{ type: 'result', result }` or `{ type: 'error', message }`. A fresh worker per job
 * means a hostile input cannot leave state behind; the time limit and heap cap stop runaway work.
 */
export function runInWorker<R, P = unknown>(moduleUrl: URL, workerData: unknown, options: WorkerRunOptions<P>): Promise<R> {
  return new Promise<R>((resolve, reject) => {
    const worker = spawnTsWorker(moduleUrl, workerData, options.resourceLimits);
    let settled = false;
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      fn();
      void worker.terminate();
    };
    const timer = setTimeout(() => finish(() => reject(new WorkerTimeoutError(options.timeoutMs))), options.timeoutMs);
    worker.on('message', (msg: { type: string; progress?: P; result?: R; message?: string }) => {
      if (msg.type === 'progress') options.onProgress?.(msg.progress as P);
      else if (msg.type === 'result') finish(() => resolve(msg.result as R));
      else if (msg.type === 'error') finish(() => reject(new Error(msg.message)));
    });
    worker.on('error', (err) => finish(() => reject(err)));
    worker.on('exit', (code) => finish(() => reject(new Error(`worker exited with code ${code} before answering`))));
  });
}
