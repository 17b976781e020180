/**
 * The job side of runInWorker (server/workers/spawn.ts): call `serveJob(async (data, progress) => result)`
 * at the top level of a job module. The module runs in its own process; it says it is ready, takes
 * one job, answers, and exits.
 */

export type JobMessage<P, R> = { type: 'ready' } | { type: 'progress'; progress: P } | { type: 'result'; result: R } | { type: 'error'; message: string };

/**
 * Test-only: the server passes `<job module file name>:<oom|offheap|abort>` from its environment variable
 * AISLEWRIGHT_TEST_JOB_CRASH (read only when NODE_ENV is "test") to make that job die hard, to prove
 * the server survives it.
 */
export const CRASH_TEST_ENV = 'AISLEWRIGHT_TEST_JOB_CRASH';

function crashForTest(request: string | null): void {
  const [module, how] = (request ?? '').split(':');
  if (!module || !process.argv[2]?.endsWith(`/${module}`)) return;
  if (how === 'abort') process.abort();
  if (how === 'offheap') {
    const hoard: Float64Array[] = [];
    for (;;) hoard.push(new Float64Array(1 << 23).fill(hoard.length));
  }
  if (how === 'oom') {
    const hoard: number[][] = [];
    for (;;) hoard.push(new Array<number>(1 << 23).fill(hoard.length));
  }
}

export function serveJob<D, P, R>(job: (data: D, progress: (p: P) => void) => Promise<R> | R): void {
  const send = process.send?.bind(process);
  if (!send) throw new Error('serveJob must run in a job process started by runInWorker');
  const post = (msg: JobMessage<P, R>, then?: () => void) => send(msg, undefined, undefined, then ? () => then() : undefined);
  // The server went away (it stopped, or gave up on the job): nothing is waiting for the answer.
  process.on('disconnect', () => process.exit(0));
  process.once('message', (envelope: { data: D; crashTest: string | null }) => {
    crashForTest(envelope.crashTest);
    Promise.resolve()
      .then(() => job(envelope.data, (progress) => post({ type: 'progress', progress })))
      .then(
        (result) => post({ type: 'result', result }, () => process.exit(0)),
        (err: unknown) => post({ type: 'error', message: err instanceof Error ? err.message : String(err) }, () => process.exit(0)),
      );
  });
  post({ type: 'ready' });
}
