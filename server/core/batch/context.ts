/**
 * What every batching method works on: the checked orders, their stops as local ids of one node
 * table, the cart, a time budget, and the small helpers they share (capacity test, FCFS rank).
 */
import type { Budget } from '../tour/budget';
import type { NodeTable } from './route-length';
import type { Batch, Cart, Order, OrderNeed } from './types';

export interface BatchContext {
  /** Orders a cart can carry; methods refer to them by position in this array. */
  readonly needs: readonly OrderNeed[];
  /** Local stop ids (into `table`) of each need, ascending, depot excluded. */
  readonly stops: readonly Int32Array[];
  readonly table: NodeTable;
  readonly cart: Cart;
  readonly orders: readonly Order[];
  readonly budget: Budget;
  /** Reports the fraction of batching done, 0…1. */
  readonly progress: (fraction: number) => void;
}

/** A batch under construction: positions into `needs`, plus its load. */
export interface Load {
  members: number[];
  kg: number;
  litres: number;
  totes: number;
}

export const emptyLoad = (): Load => ({ members: [], kg: 0, litres: 0, totes: 0 });

/** True when `need` can join `load` without exceeding any of the cart's three limits. */
export function fits(load: { kg: number; litres: number; totes: number }, need: { kg: number; litres: number; totes: number }, cart: Cart): boolean {
  return load.totes + need.totes <= cart.totes && load.kg + need.kg <= cart.maxKg && load.litres + need.litres <= cart.maxLitres;
}

/** Puts the need at `position` on the load (no capacity check: call `fits` first). */
export function addTo(load: Load, position: number, need: OrderNeed): void {
  load.members.push(position);
  load.kg += need.kg;
  load.litres += need.litres;
  load.totes += need.totes;
}

/**
 * Positions into `needs` in first-come-first-served order: due time first (undated last), then
 * priority (1 first, none last), then arrival (input order).
 */
export function fcfsOrder(ctx: BatchContext): number[] {
  const key = (p: number): [number, number, number] => {
    const o = ctx.orders[ctx.needs[p]!.index]!;
    return [o.due ?? Infinity, o.priority ?? Infinity, ctx.needs[p]!.index];
  };
  return ctx.needs
    .map((_, p) => p)
    .sort((a, b) => {
      const ka = key(a);
      const kb = key(b);
      return ka[0] - kb[0] || ka[1] - kb[1] || ka[2] - kb[2];
    });
}

/**
 * Loads (positions into `needs`) → batches (indices into the caller's orders). Orders within a batch
 * and batches within the wave are listed in FCFS order (a batch ranks by its most urgent order), so
 * trip 1 is the one to release first whatever method built it.
 */
export function toBatches(ctx: BatchContext, loads: readonly Load[]): Batch[] {
  const rank = new Int32Array(ctx.needs.length);
  fcfsOrder(ctx).forEach((p, r) => (rank[p] = r));
  return loads
    .filter((l) => l.members.length > 0)
    .map((l) => ({ ...l, members: [...l.members].sort((a, b) => rank[a]! - rank[b]!) }))
    .sort((a, b) => rank[a.members[0]!]! - rank[b.members[0]!]!)
    .map((l) => ({ orders: l.members.map((p) => ctx.needs[p]!.index), kg: l.kg, litres: l.litres, totes: l.totes }));
}
