/**
 * Seed batching (de Koster, van der Poort & Wolters 1999, IJPR 37(7), seed selection plus order
 * congruency rules): open a cart with a seed order, then keep adding the order that lengthens the
 * cart's route least, until no remaining order fits; repeat with the next seed.
 *
 * Seed rule `farthest` (default): the order whose farthest stop is farthest from the depot (ties:
 * the larger sum of its stops' depot distances, then FCFS), so far-flung orders anchor their own
 * carts and nearer orders ride along. `earliest-due`: the first order in FCFS order.
 * Addition: the remaining orders that fit are ranked by closeness, the sum over an order's stops of
 * the walking distance to the nearest stop already on the cart; the SHORTLIST closest are then
 * compared by extra route length (nearest-neighbor circuit with the order minus without), the
 * smallest wins (ties: closeness, then FCFS). Once the budget is spent, closeness alone decides.
 */
import type { BatchContext, Load } from './context';
import { addTo, emptyLoad, fcfsOrder, fits } from './context';
import { unionSorted } from './route-length';
import type { SeedRule } from './types';

/** Candidates per addition whose extra route length is computed; the rest are ranked by closeness only. */
const SHORTLIST = 12;

/**
 * O(c · (U·s + L + SHORTLIST·k²)) for c carts, U access points, s stops per cart, L lines in the
 * wave and k stops in a candidate cart.
 */
export function batchSeed(ctx: BatchContext, rule: SeedRule = 'farthest'): Load[] {
  const { needs, stops, table, cart, budget } = ctx;
  const n = needs.length;
  const rank = new Int32Array(n);
  fcfsOrder(ctx).forEach((p, r) => (rank[p] = r));

  let seedOrder: number[];
  if (rule === 'earliest-due') {
    seedOrder = fcfsOrder(ctx);
  } else {
    const far = new Float64Array(n);
    const sum = new Float64Array(n);
    for (let p = 0; p < n; p++) {
      for (const s of stops[p]!) {
        const v = table.d(0, s);
        if (v > far[p]!) far[p] = v;
        sum[p]! += v;
      }
    }
    seedOrder = Array.from({ length: n }, (_, p) => p).sort((a, b) => far[b]! - far[a]! || sum[b]! - sum[a]! || rank[a]! - rank[b]!);
  }

  const placed = new Uint8Array(n);
  const minDist = new Float64Array(table.size);
  const onCart = new Uint8Array(table.size);
  const loads: Load[] = [];
  let seedAt = 0;
  let done = 0;

  const addStops = (cartStops: number[], add: Int32Array): void => {
    for (const s of add) {
      if (onCart[s]) continue;
      onCart[s] = 1;
      cartStops.push(s);
      for (let u = 0; u < table.size; u++) {
        const v = table.d(u, s);
        if (v < minDist[u]!) minDist[u] = v;
      }
    }
  };

  while (done < n) {
    while (placed[seedOrder[seedAt]!]) seedAt++;
    const seed = seedOrder[seedAt]!;
    const load = emptyLoad();
    const cartStops: number[] = [];
    minDist.fill(Infinity);
    onCart.fill(0);
    addTo(load, seed, needs[seed]!);
    placed[seed] = 1;
    done++;
    addStops(cartStops, stops[seed]!);
    let cartSet: Int32Array = Int32Array.from(cartStops).sort();
    let cartLen = table.routeLength(cartSet);

    for (;;) {
      const cands: { p: number; close: number }[] = [];
      for (let p = 0; p < n; p++) {
        if (placed[p] || !fits(load, needs[p]!, cart)) continue;
        let close = 0;
        for (const s of stops[p]!) close += minDist[s]!;
        cands.push({ p, close });
      }
      if (cands.length === 0) break;
      cands.sort((a, b) => a.close - b.close || rank[a.p]! - rank[b.p]!);
      let best = cands[0]!;
      let bestUnion: Int32Array | null = null;
      let bestExtra = Infinity;
      if (!budget.expired()) {
        for (let c = 0; c < Math.min(SHORTLIST, cands.length); c++) {
          const union = unionSorted(cartSet, stops[cands[c]!.p]!);
          const extra = table.routeLength(union) - cartLen;
          // Strictly smaller wins: candidates are already in closeness-then-FCFS order.
          if (extra < bestExtra) {
            bestExtra = extra;
            best = cands[c]!;
            bestUnion = union;
          }
        }
      }
      addTo(load, best.p, needs[best.p]!);
      placed[best.p] = 1;
      done++;
      addStops(cartStops, stops[best.p]!);
      cartSet = bestUnion ?? unionSorted(cartSet, stops[best.p]!);
      cartLen = bestUnion ? cartLen + bestExtra : table.routeLength(cartSet);
    }
    loads.push(load);
    ctx.progress(done / n);
  }
  return loads;
}
