/**
 * Shapes of the slotting engine: which SKU lives in which bin. Units: metres, kilograms, litres;
 * days are whole numbers (any origin) so a history splits by date without time zones.
 */

/** A bin of the plan that can hold a SKU. */
export interface SlotBin {
  code: string;
  /** Walk-graph node id of the bin's access point; -1 when it cannot be reached (never a target). */
  node: number;
  /** Level from the floor, from 1. */
  level: number;
  /** The site pins it: neither its SKU nor the bin itself takes part in any move. */
  pinned?: boolean;
}

export interface SlotSku {
  code: string;
  /** Bin code today; null when the SKU has no bin on this plan. */
  bin: string | null;
  unitKg: number;
  unitLitres: number;
}

export interface HistoryLine {
  sku: string;
  qty: number;
}

export interface HistoryOrder {
  ref: string;
  /** Day of the pick, a whole number (e.g. days since 1970-01-01 in the site's zone). */
  day: number;
  lines: HistoryLine[];
}

export const SLOTTING_METHODS = ['popularity', 'cube-per-order', 'search'] as const;
export type SlottingMethod = (typeof SLOTTING_METHODS)[number];

/** Heavy items on low levels: a SKU of at least `minUnitKg` per unit only goes to bins of level ≤ `maxLevel`. */
export interface WeightRule {
  minUnitKg: number;
  maxLevel: number;
}

/** One SKU changing bin. A swap of two SKUs is two moves. */
export interface SlotMove {
  sku: string;
  fromBin: string | null;
  toBin: string;
  /** Pick lines per day of this SKU over the whole history. */
  picksPerDay: number;
  /**
   * Walking saved per day that this move accounts for, metres, estimated on the order-by-order routes
   * of the learning days (the figures of the whole move list are measured, see `SlottingFigures`).
   */
  estSavingMPerDay: number;
}

export interface PeriodFigures {
  days: number;
  orders: number;
  metresBefore: number;
  metresAfter: number;
  /** (1 − after / before) × 100; 0 when nothing was walked. */
  savingPct: number;
  /** Picker hours per day saved at the site's walking speed. */
  pickerHoursPerDay: number;
}

export interface SlottingFigures {
  /** The days the method learnt from. */
  learn: PeriodFigures;
  /** The later days it did not see: the honest figure. Zero days when the history is one day. */
  test: PeriodFigures;
  whole: PeriodFigures;
}
