/**
 * Checks every order against the cart before batching: what it weighs, how many totes its volume
 * needs, and whether any cart could carry it at all. Orders no cart can carry are returned with a
 * reason, never dropped.
 */
import type { Cart, Order, OrderNeed, Unplaced } from './types';

/** Litres of one tote: the cart's volume shared evenly over its totes. */
export function toteLitres(cart: Cart): number {
  return cart.maxLitres / cart.totes;
}

/**
 * Totes an order of `litres` needs: one, or more when its volume exceeds one tote.
 * A relative slack of 1e-9 keeps 40.000000001 L in a 40 L tote from asking for a second tote.
 */
export function totesNeeded(litres: number, cart: Cart): number {
  const per = toteLitres(cart);
  if (!(per > 0)) return litres > 0 ? Infinity : 1;
  return Math.max(1, Math.ceil(litres / per - 1e-9));
}

/** Throws RangeError unless the cart has a positive whole number of totes and positive finite limits. */
export function checkCart(cart: Cart): void {
  if (!Number.isInteger(cart.totes) || cart.totes < 1) throw new RangeError(`a cart needs a positive whole number of totes, got ${cart.totes}`);
  for (const [name, v] of [
    ['maxKg', cart.maxKg],
    ['maxLitres', cart.maxLitres],
  ] as const) {
    if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`cart ${name} must be a positive number, got ${v}`);
  }
}

const round = (v: number): number => Math.round(v * 1000) / 1000;

export interface PreparedOrders {
  /** Orders a cart can carry, in input order. */
  needs: OrderNeed[];
  unplaced: Unplaced[];
}

/**
 * Splits `orders` into those a cart can carry and those it cannot (with a reason). `reachable(node)`
 * says whether a picker can walk from the depot to the node and back. O(total lines · log).
 */
export function prepareOrders(orders: readonly Order[], cart: Cart, reachable: (node: number) => boolean): PreparedOrders {
  checkCart(cart);
  const needs: OrderNeed[] = [];
  const unplaced: Unplaced[] = [];
  const seen = new Set<string>();
  for (let i = 0; i < orders.length; i++) {
    const o = orders[i]!;
    if (seen.has(o.ref)) {
      unplaced.push({ order: o.ref, code: 'duplicate_ref', reason: `order ${o.ref} appears more than once in the wave; only its first copy is planned` });
      continue;
    }
    seen.add(o.ref);
    if (o.lines.length === 0) {
      unplaced.push({ order: o.ref, code: 'no_lines', reason: `order ${o.ref} has no lines` });
      continue;
    }
    let kg = 0;
    let litres = 0;
    let bad: string | null = null;
    let unreachable: string | null = null;
    const nodes = new Set<number>();
    for (const line of o.lines) {
      const label = line.bin ?? `node ${line.node}`;
      if (!(line.qty > 0) || !Number.isFinite(line.qty)) bad ??= `line ${line.sku} has quantity ${line.qty}; it must be a positive number`;
      else if (!(line.unitKg >= 0) || !Number.isFinite(line.unitKg)) bad ??= `line ${line.sku} has unit weight ${line.unitKg} kg`;
      else if (!(line.unitLitres >= 0) || !Number.isFinite(line.unitLitres)) bad ??= `line ${line.sku} has unit volume ${line.unitLitres} L`;
      else if (!Number.isInteger(line.node) || line.node < 0) bad ??= `line ${line.sku} has no access point (node ${line.node})`;
      else if (!reachable(line.node)) unreachable ??= `bin ${label} of SKU ${line.sku} cannot be reached from the depot`;
      kg += line.qty * line.unitKg;
      litres += line.qty * line.unitLitres;
      nodes.add(line.node);
    }
    if (bad) {
      unplaced.push({ order: o.ref, code: 'bad_line', reason: bad });
      continue;
    }
    if (unreachable) {
      unplaced.push({ order: o.ref, code: 'unreachable', reason: unreachable });
      continue;
    }
    const totes = totesNeeded(litres, cart);
    if (kg > cart.maxKg) {
      unplaced.push({ order: o.ref, code: 'too_heavy', reason: `order ${o.ref} weighs ${round(kg)} kg; the cart carries at most ${cart.maxKg} kg` });
    } else if (litres > cart.maxLitres || totes > cart.totes) {
      unplaced.push({
        order: o.ref,
        code: 'too_voluminous',
        reason: `order ${o.ref} fills ${round(litres)} L (${totes} totes of ${round(toteLitres(cart))} L); the cart holds ${cart.maxLitres} L in ${cart.totes} totes`,
      });
    } else {
      needs.push({ index: i, kg, litres, totes, nodes: Int32Array.from([...nodes].sort((a, b) => a - b)) });
    }
  }
  return { needs, unplaced };
}
