import type { Logger } from 'pino';

/** Work that runs after the answer has been sent (mail for a reset request), off the request path. */
export interface Background {
  run(name: string, task: () => Promise<void>): void;
  /** Resolves once every task started so far has finished (tests, shutdown). */
  settled(): Promise<void>;
}

export function createBackground(logger: Logger): Background {
  const pending = new Set<Promise<void>>();
  return {
    run(name, task) {
      // setImmediate: the route's answer is written in the current turn, the task starts after it.
      const p: Promise<void> = new Promise<void>((resolve) => setImmediate(resolve))
        .then(task)
        .catch((err: unknown) => logger.error({ err, task: name }, 'background task failed'))
        .finally(() => pending.delete(p));
      pending.add(p);
    },
    async settled() {
      while (pending.size > 0) await Promise.all([...pending]);
    },
  };
}
