/**
 * Periodic housekeeping inside the server: mail retries every minute, retention pruning daily, and
 * the backup schedule. Timers are unref'd (they never keep the process alive) and `stop()` clears
 * them and waits for a run under way, so shutdown and tests close cleanly.
 */
import type { Deps } from '../deps';
import { pruneNow } from '../retention/retention.service';

export interface Tasks {
  stop(): Promise<void>;
}

interface Every {
  name: string;
  ms: number;
  firstMs: number;
  run: () => Promise<unknown>;
}

export const MAIL_RETRY_EVERY_MS = 60_000;
export const PRUNE_EVERY_MS = 24 * 3_600_000;

export function startTasks(deps: Deps): Tasks {
  const jobs: Every[] = [
    { name: 'mail-retry', ms: MAIL_RETRY_EVERY_MS, firstMs: 15_000, run: () => deps.mailer.retryDue() },
    { name: 'retention', ms: PRUNE_EVERY_MS, firstMs: 60_000, run: () => pruneNow(deps.db) },
  ];
  const timers = new Set<NodeJS.Timeout>();
  const running = new Set<Promise<unknown>>();
  let stopped = false;

  const arm = (job: Every, wait: number) => {
    if (stopped) return;
    const t = setTimeout(() => {
      timers.delete(t);
      const p = job
        .run()
        .catch((err: unknown) => deps.logger.error({ task: job.name, err: (err as Error).message }, 'scheduled task failed'))
        .finally(() => {
          running.delete(p);
          arm(job, job.ms);
        });
      running.add(p);
    }, wait);
    t.unref();
    timers.add(t);
  };
  for (const job of jobs) arm(job, job.firstMs);
  deps.backups?.start();

  return {
    async stop() {
      stopped = true;
      for (const t of timers) clearTimeout(t);
      timers.clear();
      await deps.backups?.stop();
      await Promise.allSettled([...running]);
    },
  };
}
