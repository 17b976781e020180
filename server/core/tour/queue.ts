/**
 * The searches' queue of points to look at (don't-look bits, J. L. Bentley, ORSA J. Computing 4(4),
 * 1992): each point at most once, first in first out, in a ring of n places.
 */
export interface PointQueue {
  /** Queues point c unless it is queued already. */
  push(c: number): void;
  /** Takes the oldest point off the queue (the queue must not be empty). */
  pop(): number;
  /** Points queued. */
  size(): number;
  /** Empties the queue. O(points queued). */
  clear(): void;
}

export function createPointQueue(n: number): PointQueue {
  const ring = new Int32Array(Math.max(1, n));
  const queued = new Uint8Array(n);
  let head = 0;
  let count = 0;
  const pop = (): number => {
    const c = ring[head]!;
    head = head + 1 === n ? 0 : head + 1;
    count--;
    queued[c] = 0;
    return c;
  };
  return {
    push(c) {
      if (queued[c]) return;
      queued[c] = 1;
      ring[(head + count) % n] = c;
      count++;
    },
    pop,
    size: () => count,
    clear() {
      while (count > 0) pop();
      head = 0;
    },
  };
}
