/** Cart set-up before the first stop: the trip's totes and the orders in each (pure, for tests). */
import type { PickTrip } from '@shared/picking';

export interface CartTote {
  tote: number;
  orders: string[];
}

/** Each tote of the trip with its order(s), by tote number (the printed pick list's "Tote 1 = …"). */
export function cartTotes(trip: Pick<PickTrip, 'stopList'>): CartTote[] {
  const byTote = new Map<number, Set<string>>();
  for (const s of trip.stopList)
    for (const l of s.lines) {
      if (!byTote.has(l.tote)) byTote.set(l.tote, new Set());
      byTote.get(l.tote)!.add(l.orderRef);
    }
  return [...byTote].sort((a, b) => a[0] - b[0]).map(([tote, orders]) => ({ tote, orders: [...orders].sort() }));
}

/**
 * The tote number a scanned label names: "3", "T3", "T-03", "TOTE 3" (any case, scanner padding
 * trimmed). Null for anything else. Tote labels carrying their number is common practice.
 */
export function toteFromScan(scanned: string): number | null {
  const m = /^(?:TOTE|T)?[\s-]*0*(\d{1,3})$/i.exec(scanned.trim());
  if (!m) return null;
  const n = Number(m[1]);
  return n >= 1 ? n : null;
}

/** Whether a trip still needs its cart set up: started, not confirmed, and no line worked yet. */
export const needsCartSetup = (trip: Pick<PickTrip, 'status' | 'cartReadyAt' | 'stopList'>): boolean =>
  trip.status === 'picking' && !trip.cartReadyAt && trip.stopList.every((s) => s.lines.every((l) => l.status === 'open'));
