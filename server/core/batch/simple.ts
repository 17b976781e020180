/**
 * The two batching methods that look at no distances: one order per trip (the baseline every other
 * method is measured against) and first-come-first-served.
 */
import type { BatchContext, Load } from './context';
import { addTo, emptyLoad, fcfsOrder, fits } from './context';

/** One order per trip, in FCFS order. O(n log n). */
export function batchSingle(ctx: BatchContext): Load[] {
  return fcfsOrder(ctx).map((p) => {
    const load = emptyLoad();
    addTo(load, p, ctx.needs[p]!);
    return load;
  });
}

/**
 * FCFS: orders in due/arrival order fill the cart until the next one does not fit; that one starts
 * the next cart (no look-ahead, as the method is defined in de Koster, van der Poort & Wolters 1999,
 * IJPR 37(7)). O(n log n).
 */
export function batchFcfs(ctx: BatchContext): Load[] {
  const loads: Load[] = [];
  let cur = emptyLoad();
  for (const p of fcfsOrder(ctx)) {
    const need = ctx.needs[p]!;
    if (cur.members.length > 0 && !fits(cur, need, ctx.cart)) {
      loads.push(cur);
      cur = emptyLoad();
    }
    addTo(cur, p, need);
  }
  if (cur.members.length > 0) loads.push(cur);
  return loads;
}
