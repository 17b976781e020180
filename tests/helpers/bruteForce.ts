/**
 * Test oracle: enumerates every distinct closed circuit of a complete graph by brute force. A circuit
 * and its reverse are one circuit, so with the depot fixed only orders whose first stop is lower than
 * their last are kept: (n − 1)!/2 circuits for n ≥ 3 (standard combinatorics).
 */
import type { DistanceMatrix } from '../../server/core/matrix';
import { circuitLength } from '../../server/core/matrix';

export interface BruteForceResult {
  count: number;
  length: number;
  order: number[];
}

export function bruteForce(m: DistanceMatrix, depot = 0): BruteForceResult {
  const rest: number[] = [];
  for (let i = 0; i < m.n; i++) if (i !== depot) rest.push(i);
  if (rest.length <= 1) {
    const order = [depot, ...rest];
    return { count: 1, length: circuitLength(m, order), order };
  }
  let count = 0;
  let bestLen = Infinity;
  let bestOrder: number[] = [];
  const used = new Array<boolean>(rest.length).fill(false);
  const cur: number[] = [depot];
  const visit = (): void => {
    if (cur.length === m.n) {
      if (cur[1]! > cur[cur.length - 1]!) return;
      count++;
      const len = circuitLength(m, cur);
      if (len < bestLen) {
        bestLen = len;
        bestOrder = cur.slice();
      }
      return;
    }
    for (let i = 0; i < rest.length; i++) {
      if (used[i]) continue;
      used[i] = true;
      cur.push(rest[i]!);
      visit();
      cur.pop();
      used[i] = false;
    }
  };
  visit();
  return { count, length: bestLen, order: bestOrder };
}
