/**
 * Slotting orders onto a site model: each order line goes to the access-point node of its bin. An
 * order with a line that cannot be slotted is left out whole, with one reason a supervisor can act on,
 * worded the same for the wave planner, studies and the command line.
 */
import type { Order } from '../batch/types';
import type { SiteModel } from './model';

export interface SlotLine {
  sku: string;
  qty: number;
  /** Bin code the SKU is slotted in. */
  bin: string;
  unitKg: number;
  unitLitres: number;
}

export interface SlotOrder {
  ref: string;
  /** ISO 8601 or null. */
  due: string | null;
  /** 1 is the most urgent; null for none. */
  priority: number | null;
  lines: readonly SlotLine[];
}

/** Why a line cannot be slotted: its bin is not on the plan, lies off the walk graph, or no walk from the depot reaches it. */
export type SlotProblem = 'unknown_bin' | 'bin_off_plan' | 'unreachable';

export interface Unslotted {
  order: string;
  code: SlotProblem;
  reason: string;
}

/** Why a bin cannot take a pick on this model, or null when it can. O(1). */
export function slotProblem(model: SiteModel, bin: string): SlotProblem | null {
  if (model.binIndex(bin) === undefined) return 'unknown_bin';
  const node = model.binNode(bin);
  if (node === undefined) return 'bin_off_plan';
  return model.reachesDepot(node) ? null : 'unreachable';
}

/** The one wording of a slotting problem of a SKU's bin. */
export function slotReason(problem: SlotProblem, bin: string, sku: string): string {
  switch (problem) {
    case 'unknown_bin':
      return `bin ${bin} of SKU ${sku} is not on the floor plan`;
    case 'bin_off_plan':
      return `bin ${bin} of SKU ${sku} has no access point on its aisle`;
    case 'unreachable':
      return `bin ${bin} of SKU ${sku} cannot be reached from the depot`;
  }
}

/**
 * Engine orders (../batch/types.ts) of `orders` on the model, in input order; an order whose lines do
 * not all slot is returned in `unslotted` with the first line's problem. O(total lines).
 */
export function slotOrders(model: SiteModel, orders: readonly SlotOrder[]): { orders: Order[]; unslotted: Unslotted[] } {
  const out: Order[] = [];
  const unslotted: Unslotted[] = [];
  for (const o of orders) {
    let problem: Unslotted | null = null;
    for (const l of o.lines) {
      const p = slotProblem(model, l.bin);
      if (p) {
        problem = { order: o.ref, code: p, reason: slotReason(p, l.bin, l.sku) };
        break;
      }
    }
    if (problem) {
      unslotted.push(problem);
      continue;
    }
    out.push({
      ref: o.ref,
      ...(o.due ? { due: Date.parse(o.due) } : {}),
      ...(o.priority !== null ? { priority: o.priority } : {}),
      lines: o.lines.map((l) => ({ sku: l.sku, qty: l.qty, node: model.binNode(l.bin)!, bin: l.bin, unitKg: l.unitKg, unitLitres: l.unitLitres })),
    });
  }
  return { orders: out, unslotted };
}
