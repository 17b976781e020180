/**
 * Shapes of the batching engine: orders with their lines already slotted (each line knows the
 * access-point node of its bin), a cart profile, and batches of orders that fit one cart.
 * Units: kilograms, litres, metres; times as epoch milliseconds.
 */

export interface OrderLine {
  sku: string;
  /** Units ordered, > 0. */
  qty: number;
  /** Walk-graph node id of the access point of the line's bin. */
  node: number;
  /** Bin code shown on the pick list; the node id (as text) is shown when absent. */
  bin?: string;
  /** Kilograms per unit, ≥ 0. */
  unitKg: number;
  /** Litres per unit, ≥ 0. */
  unitLitres: number;
}

export interface Order {
  /** The order reference as the host system sends it; unique within a wave. */
  ref: string;
  lines: OrderLine[];
  /** Due time, epoch milliseconds; orders without one come after every dated order. */
  due?: number;
  /** 1 is the most urgent (common practice: "P1"); orders without one come after every prioritised order. */
  priority?: number;
}

/** Cart profile: totes (one order per tote unless its volume needs more), max load in kg and litres. */
export interface Cart {
  totes: number;
  maxKg: number;
  maxLitres: number;
}

export const BATCHING_METHODS = ['single', 'fcfs', 'seed', 'savings', 'search'] as const;
export type BatchingMethod = (typeof BATCHING_METHODS)[number];

/**
 * Seed rules: `farthest` takes the order whose farthest stop is farthest from the depot (walking
 * distance), `earliest-due` the order due first; both rules are among those compared by de Koster,
 * van der Poort & Wolters (1999), IJPR 37(7).
 */
export const SEED_RULES = ['farthest', 'earliest-due'] as const;
export type SeedRule = (typeof SEED_RULES)[number];

export type UnplacedCode = 'no_lines' | 'bad_line' | 'too_heavy' | 'too_voluminous' | 'unreachable' | 'duplicate_ref';

export interface Unplaced {
  /** Order reference. */
  order: string;
  code: UnplacedCode;
  /** One sentence a supervisor can act on, with the figures. */
  reason: string;
}

/** What one order asks of a cart, once checked. */
export interface OrderNeed {
  /** Index into the caller's `orders` array. */
  index: number;
  kg: number;
  litres: number;
  totes: number;
  /** Distinct access-point nodes of the order's lines, ascending. */
  nodes: Int32Array;
}

/** One cart load: indices into the caller's `orders` array, in the order they were added. */
export interface Batch {
  orders: number[];
  kg: number;
  litres: number;
  totes: number;
}
