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

/**
 * Largest shortening any double bridge gives (the 4-opt move A1 A2 A3 A4 → A1 A4 A3 A2 of Martin, Otto &
 * Felten 1991, as Johnson & McGeoch 1997 write it; ≤ 0 when none shortens), with its cut positions:
 * every choice of four segments of at least one point, each circuit rebuilt and re-summed. O(n⁵).
 */
export function bestDoubleBridgeGain(m: DistanceMatrix, order: readonly number[]): { gain: number; next: number[] } {
  const n = order.length;
  const base = circuitLength(m, order);
  let best = -Infinity;
  let next: number[] = [...order];
  // Cuts after positions p < q < r < s; A1 = order[s+1 … p] (wrapping), A2 = (p, q], A3 = (q, r], A4 = (r, s].
  for (let p = 0; p < n; p++)
    for (let q = p + 1; q < n; q++)
      for (let r = q + 1; r < n; r++)
        for (let s = r + 1; s < n; s++) {
          if ((p - s + n) % n === 0) continue; // A1 needs a point
          const a1 = [...order.slice(s + 1), ...order.slice(0, p + 1)];
          const out = [...a1, ...order.slice(r + 1, s + 1), ...order.slice(q + 1, r + 1), ...order.slice(p + 1, q + 1)];
          const gain = base - circuitLength(m, out);
          if (gain > best) {
            best = gain;
            next = out;
          }
        }
  return { gain: best, next };
}
