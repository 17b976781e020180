/**
 * The app's job runner (server/workers/jobs.ts): in memory on SQLite, pg-boss with `background_jobs`
 * when TEST_DATABASE_URL names a PostgreSQL server. The same checks hold for both.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeDeps, dropTestDb } from '../helpers/app';
import type { Deps } from '../../server/deps';
import { whenJobEnds, type JobContext } from '../../server/workers/jobs';

function deferred() {
  let resolve!: () => void;
  const promise = new Promise<void>((r) => (resolve = r));
  return { promise, resolve };
}

describe('the job runner', () => {
  let deps: Deps;
  const log: string[] = [];
  const gates = new Map<string, ReturnType<typeof deferred>>();
  const gate = (name: string) => {
    if (!gates.has(name)) gates.set(name, deferred());
    return gates.get(name)!;
  };

  beforeAll(async () => {
    deps = await makeDeps();
    deps.jobs.define<{ name: string }, { echoed: string }>({
      name: 'test-gated',
      expireInSeconds: 60,
      run: async ({ name }, job: JobContext) => {
        log.push(`start ${name}`);
        job.progress(0.5, 'halfway');
        await Promise.race([
          gate(name).promise,
          new Promise((_r, reject) => job.signal.addEventListener('abort', () => reject(new Error('aborted')), { once: true })),
        ]);
        log.push(`end ${name}`);
        return { echoed: name };
      },
    });
    deps.jobs.define<{ fail: string }, null>({
      name: 'test-failing',
      expireInSeconds: 60,
      run: async ({ fail }) => {
        throw new Error(fail);
      },
      describeFailure: (err) => `The test job ${(err as Error).message}`,
    });
  });

  afterAll(async () => {
    await deps.jobs.close();
    await dropTestDb(deps.db);
  });

  const waitFor = async (check: () => Promise<boolean>) => {
    for (let i = 0; i < 300; i++) {
      if (await check()) return;
      await new Promise((r) => setTimeout(r, 50));
    }
    throw new Error('timed out');
  };

  it('runs the jobs of one kind one at a time, in the order given, and keeps each result', async () => {
    const first = await deps.jobs.submit('test-gated', { name: 'one' }, { siteId: 7, key: 'k:1' });
    const second = await deps.jobs.submit('test-gated', { name: 'two' }, { siteId: 7, key: 'k:1' });
    expect(first.state).toBe('queued');
    await waitFor(async () => (await deps.jobs.get(first.id))?.state === 'running');
    const running = (await deps.jobs.get(first.id))!;
    await waitFor(async () => (await deps.jobs.get(first.id))!.phase === 'halfway');
    expect((await deps.jobs.get(first.id))!.progress).toBe(0.5);
    expect(running.siteId).toBe(7);
    // The second waits while the first holds its kind's lane.
    await new Promise((r) => setTimeout(r, 300));
    expect((await deps.jobs.get(second.id))!.state).toBe('queued');
    expect(log).toEqual(['start one']);
    gate('one').resolve();
    const done = await whenJobEnds<{ echoed: string }>(deps.jobs, first.id);
    expect(done.state).toBe('done');
    expect(done.result).toEqual({ echoed: 'one' });
    await waitFor(async () => (await deps.jobs.get(second.id))?.state === 'running');
    expect(log).toEqual(['start one', 'end one', 'start two']);
    // The newest job of a key is the second.
    expect((await deps.jobs.latest('k:1'))!.id).toBe(second.id);
    gate('two').resolve();
    expect((await whenJobEnds(deps.jobs, second.id)).state).toBe('done');
  });

  it('cancels a running job: its signal aborts, it ends cancelled and its work stops', async () => {
    const job = await deps.jobs.submit('test-gated', { name: 'three' });
    await waitFor(async () => (await deps.jobs.get(job.id))?.state === 'running');
    const changes: string[] = [];
    const stop = deps.jobs.watch(job.id, () => changes.push('changed'));
    const after = await deps.jobs.cancel(job.id);
    stop();
    expect(after!.state).toBe('cancelled');
    expect(after!.finishedAt).not.toBeNull();
    expect(changes.length).toBeGreaterThan(0);
    await deps.jobs.settled();
    await new Promise((r) => setTimeout(r, 200));
    // Aborted, not finished: the gate was never opened and "end three" never logged.
    expect(log).not.toContain('end three');
    expect((await deps.jobs.get(job.id))!.state).toBe('cancelled');
    // A finished job is left as it is.
    expect((await deps.jobs.cancel(job.id))!.state).toBe('cancelled');
    expect(await deps.jobs.cancel('00000000-0000-4000-8000-000000000000')).toBeNull();
  });

  it('ends a job that throws as failed, in the words its kind gives, without retrying it', async () => {
    const job = await deps.jobs.submit('test-failing', { fail: 'broke on purpose' });
    const end = await whenJobEnds(deps.jobs, job.id);
    expect(end.state).toBe('failed');
    expect(end.error).toBe('The test job broke on purpose');
    await new Promise((r) => setTimeout(r, 500));
    expect((await deps.jobs.get(job.id))!.state).toBe('failed');
  });

  it('refuses a kind nobody defined', async () => {
    await expect(deps.jobs.submit('no-such-kind', {})).rejects.toThrow(/unknown job kind/);
  });
});
