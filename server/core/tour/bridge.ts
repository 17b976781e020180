import type { Budget } from './budget';
import type { Neighbors } from './local';

/**
 * A double bridge that shortens the circuit, as `Kicks.doubleBridge` takes it: the three segments of
 * `l1`, `l2`, `l3` points from array position `at` put in reverse order; `gain` is the saving (> 0).
 */
export interface BridgeMove {
  at: number;
  l1: number;
  l2: number;
  l3: number;
  gain: number;
}

/**
 * The best shortening double bridge (the non-sequential 4-opt move A1 A2 A3 A4 → A1 A4 A3 A2) built
 * from candidate edges, or undefined when there is none; no sequential move (2-opt, 3-opt, Lin–Kernighan
 * chain) can make it. It is searched as two exchanges that each alone would split the circuit in two:
 * the first takes out (t[p], t[p+1]) and (t[r], t[r+1]) and puts in (t[p], t[r+1]) and (t[r], t[p+1]),
 * one of them a candidate edge, with a positive gain (the gain criterion of Lin & Kernighan 1973); the
 * second joins the two circuits again by the same exchange on one edge of each, one new edge again a
 * candidate, and the move is taken when both together gain more than `eps` (LKH's non-sequential
 * moves: K. Helsgaun, Math. Prog. Comp. 1, 2009, section 5.3). The second exchange walks the smaller
 * of the two circuits: O(Σ smaller size · K) over the first exchanges with a positive gain. When `budget`
 * expires during the sweep (tested every 32 points) it gives up and returns undefined.
 */
export function bestDoubleBridge(
  tour: Int32Array,
  dist: (a: number, b: number) => number,
  neighbors: Neighbors,
  eps: number,
  budget?: Budget,
): BridgeMove | undefined {
  const n = tour.length;
  if (n < 8) return undefined;
  const K = neighbors.k;
  const nb = neighbors.list;
  const pos = new Int32Array(n);
  for (let i = 0; i < n; i++) pos[tour[i]!] = i;
  const at = (i: number): number => tour[i >= n ? i - n : i]!;
  /** Gain of the splitting exchange on the edges after positions i and j. */
  const split = (i: number, j: number): number => {
    const a = tour[i]!;
    const a1 = at(i + 1);
    const b = tour[j]!;
    const b1 = at(j + 1);
    return dist(a, a1) + dist(b, b1) - dist(a, b1) - dist(b, a1);
  };
  /** Position x lies on the cyclic stretch of `len` positions from `lo`. */
  const within = (x: number, lo: number, len: number): boolean => (x - lo + n) % n < len;
  let best = eps;
  let p0 = -1;
  let q0 = -1;
  let r0 = -1;
  let s0 = -1;
  for (let x = 0; x < n; x++) {
    if ((x & 31) === 31 && budget?.expired()) return undefined;
    for (let k = 0; k < K; k++) {
      const y = nb[x * K + k]!;
      for (let role = 0; role < 2; role++) {
        // New edge (x, y) as (t[p], t[r+1]) or as (t[r], t[p+1]).
        const p = role === 0 ? pos[x]! : (pos[y]! - 1 + n) % n;
        const r = role === 0 ? (pos[y]! - 1 + n) % n : pos[x]!;
        const l1 = (r - p + n) % n; // circuit one: positions p+1 … r
        if (l1 < 2 || l1 > n - 2) continue;
        const g1 = split(p, r);
        if (!(g1 > 0)) continue;
        // Walk the smaller circuit S; its partner circuit O.
        const small = Math.min(l1, n - l1);
        const lo = l1 <= n - l1 ? (p + 1) % n : (r + 1) % n;
        const olo = l1 <= n - l1 ? (r + 1) % n : (p + 1) % n;
        const olen = n - small;
        const hi = (lo + small - 1) % n;
        const ohi = (olo + olen - 1) % n;
        for (let c = 0, i = lo; c < small; c++, i = i + 1 === n ? 0 : i + 1) {
          const u = tour[i]!;
          for (let j = 0; j < K; j++) {
            const v = nb[u * K + j]!;
            const pv = pos[v]!;
            if (!within(pv, olo, olen)) continue;
            // (u, v) as (t[a], t[b+1]) or as (t[a+1], t[b]); a, a+1 in S and b, b+1 in O.
            for (let form = 0; form < 2; form++) {
              let a: number;
              let b: number;
              if (form === 0) {
                if (i === hi || pv === olo) continue;
                a = i;
                b = (pv - 1 + n) % n;
              } else {
                if (i === lo || pv === ohi) continue;
                a = (i - 1 + n) % n;
                b = pv;
              }
              const g = g1 + split(a, b);
              if (g > best) {
                best = g;
                p0 = p;
                r0 = r;
                q0 = a;
                s0 = b;
              }
            }
          }
        }
      }
    }
  }
  if (p0 < 0) return undefined;
  // The four cut positions in circuit order from p0: segments A2 A3 A4 A1 after each cut.
  const rel = [0, (q0 - p0 + n) % n, (r0 - p0 + n) % n, (s0 - p0 + n) % n].sort((u, v) => u - v);
  const lens = [rel[1]! - rel[0]!, rel[2]! - rel[1]!, rel[3]! - rel[2]!, n - rel[3]!];
  // Leave the longest segment in place (the move is the same from any of the four).
  let keep = 0;
  for (let j = 1; j < 4; j++) if (lens[j]! > lens[keep]!) keep = j;
  const first = (keep + 1) % 4;
  return {
    at: (p0 + 1 + rel[first]!) % n,
    l1: lens[first]!,
    l2: lens[(first + 1) % 4]!,
    l3: lens[(first + 2) % 4]!,
    gain: best,
  };
}
