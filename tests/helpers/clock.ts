/** A clock that advances a fixed step on every reading: time budgets then end after a fixed amount of work. */
export function steppingClock(stepMs = 0.01): () => number {
  let t = 0;
  return () => (t += stepMs);
}
