/**
 * Independent local-optimality checker for tests: applies every 2-opt and every Or-opt move (segment
 * of 1–3 points, both orientations, every insertion edge) by rebuilding the circuit and re-summing
 * it with `circuitLength`, so it shares no delta formula with the engine. O(n³).
 */
import type { DistanceMatrix } from '../../server/core/matrix';
import { circuitLength } from '../../server/core/matrix';

/** Largest shortening any single 2-opt move gives (≤ 0 when the circuit is 2-optimal). */
export function bestTwoOptGain(m: DistanceMatrix, order: readonly number[]): number {
  const n = order.length;
  const base = circuitLength(m, order);
  let best = -Infinity;
  for (let i = 0; i < n - 1; i++) {
    for (let j = i + 2; j < n; j++) {
      if (i === 0 && j === n - 1) continue;
      // Reverse order[i+1..j]: replaces edges (i, i+1) and (j, j+1).
      const next = [...order.slice(0, i + 1), ...order.slice(i + 1, j + 1).reverse(), ...order.slice(j + 1)];
      best = Math.max(best, base - circuitLength(m, next));
    }
  }
  return best;
}

/** Largest shortening any single Or-opt move gives (≤ 0 when the circuit is Or-optimal). */
export function bestOrOptGain(m: DistanceMatrix, order: readonly number[]): number {
  const n = order.length;
  const base = circuitLength(m, order);
  let best = -Infinity;
  for (let L = 1; L <= 3 && n - L >= 3; L++) {
    for (let i = 0; i < n; i++) {
      // Rotate so the segment is at the front, then reinsert it after each remaining position.
      const rot = [...order.slice(i), ...order.slice(0, i)];
      const seg = rot.slice(0, L);
      const rest = rot.slice(L);
      for (let k = 0; k < rest.length - 1; k++) {
        for (const piece of [seg, [...seg].reverse()]) {
          const next = [...rest.slice(0, k + 1), ...piece, ...rest.slice(k + 1)];
          best = Math.max(best, base - circuitLength(m, next));
        }
      }
    }
  }
  return best;
}
