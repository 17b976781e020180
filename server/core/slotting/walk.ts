/**
 * Walking of a history under one slotting: each day's orders batched and routed the way waves are
 * (the real batcher and tour engine), so "before" and "after" differ only by where the SKUs live.
 */
import { batchOrders } from '../batch/index';
import type { Cart, Order } from '../batch/types';
import type { Clock } from '../clock';
import { matrixFromFunction } from '../matrix';
import { solveTour } from '../tour/index';
import type { BatchingMethod } from '../batch/types';
import type { HistoryOrder } from './types';

export interface WalkContext {
  depotNode: number;
  /** Shortest walking distance in metres between two node ids; Infinity when no path. */
  distance: (a: number, b: number) => number;
  cart: Cart;
  batching: BatchingMethod;
  /** Unit weight and volume of a SKU; null for a SKU missing from the master (its lines are skipped). */
  unitOf: (sku: string) => { kg: number; litres: number } | null;
  /** Budget for one day's batching, milliseconds. */
  batchTimeLimitMs: number;
  /** Budget for one trip's circuit, milliseconds. */
  tripTimeLimitMs: number;
  clock?: Clock;
}

export interface HistoryWalk {
  metres: number;
  trips: number;
  /** Orders no trip could carry (no placed line, too heavy, cut off), counted, not walked. */
  unplaced: number;
}

/**
 * Metres walked over `orders` when SKU `s` is picked at node `nodeOf(s)` (−1: not on the plan, line
 * skipped). Orders are grouped by day; each day is one batching run, each batch one closed circuit
 * (`best` construction improved by 2-opt and Or-opt). O(days × (batching + trips × routing)).
 */
export function walkHistory(orders: readonly HistoryOrder[], nodeOf: (sku: string) => number, ctx: WalkContext): HistoryWalk {
  const byDay = new Map<number, HistoryOrder[]>();
  for (const o of orders) {
    const list = byDay.get(o.day);
    if (list) list.push(o);
    else byDay.set(o.day, [o]);
  }
  let metres = 0;
  let trips = 0;
  let unplaced = 0;
  for (const day of [...byDay.keys()].sort((a, b) => a - b)) {
    const dayOrders: Order[] = [];
    for (const o of byDay.get(day)!) {
      const lines: Order['lines'] = [];
      for (const l of o.lines) {
        const node = nodeOf(l.sku);
        const unit = ctx.unitOf(l.sku);
        if (node < 0 || !unit) continue;
        lines.push({ sku: l.sku, qty: l.qty, node, unitKg: unit.kg, unitLitres: unit.litres });
      }
      if (lines.length > 0) dayOrders.push({ ref: o.ref, lines });
      else unplaced++;
    }
    if (dayOrders.length === 0) continue;
    const batched = batchOrders({
      orders: dayOrders,
      cart: ctx.cart,
      method: ctx.batching,
      depotNode: ctx.depotNode,
      distance: ctx.distance,
      timeLimitMs: ctx.batchTimeLimitMs,
      ...(ctx.clock ? { clock: ctx.clock } : {}),
    });
    unplaced += batched.unplaced.length;
    for (const b of batched.batches) {
      const nodes = [ctx.depotNode, ...new Set(b.orders.flatMap((i) => dayOrders[i]!.lines.map((l) => l.node)))].filter(
        (v, i) => i === 0 || v !== ctx.depotNode,
      );
      trips++;
      if (nodes.length < 2) continue;
      const m = matrixFromFunction(nodes.length, (i, j) => ctx.distance(nodes[i]!, nodes[j]!));
      metres += solveTour(m, { method: 'best', improve: 'local', timeLimitMs: ctx.tripTimeLimitMs, ...(ctx.clock ? { clock: ctx.clock } : {}) }).length;
    }
  }
  return { metres, trips, unplaced };
}
