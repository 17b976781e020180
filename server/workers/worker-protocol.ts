import { parentPort, workerData } from 'node:worker_threads';

/**
 * The worker side of runInWorker: call `serveJob(async (data, progress) => result)` at the top level
 * of a worker module.
 */
export function serveJob<D, P, R>(job: (data: D, progress: (p: P) => void) => Promise<R> | R): void {
  const port = parentPort;
  if (!port) throw new Error('serveJob must run inside a worker thread');
  const data = workerData as D;
  Promise.resolve()
    .then(() => job(data, (progress) => port.postMessage({ type: 'progress', progress })))
    .then(
      (result) => port.postMessage({ type: 'result', result }),
      (err: unknown) => port.postMessage({ type: 'error', message: err instanceof Error ? err.message : String(err) }),
    );
}
