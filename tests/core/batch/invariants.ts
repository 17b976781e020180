/**
 * One checker for every planned wave in the tests: recomputes loads, totes and walking from the
 * input orders alone (not from the engine's own figures) and lists each broken promise.
 */
import type { Cart, Order } from '../../../server/core/batch/types';
import type { PlanWaveResult } from '../../../server/core/batch/plan-wave';

export interface WaveInput {
  orders: readonly Order[];
  cart: Cart;
  depotNode: number;
  distance: (a: number, b: number) => number;
}

const lineKey = (ref: string, sku: string, qty: number, bin: string): string => JSON.stringify([ref, sku, qty, bin]);

/** Problems found, empty when the wave keeps every promise. */
export function waveProblems(input: WaveInput, wave: PlanWaveResult): string[] {
  const problems: string[] = [];
  const { orders, cart } = input;
  const byRef = new Map(orders.map((o) => [o.ref, o]));
  const seen = new Map<string, number>();
  for (const u of wave.unplaced) {
    if (!u.reason) problems.push(`unplaced ${u.order} has no reason`);
    if (!byRef.has(u.order)) problems.push(`unplaced ${u.order} is not an input order`);
  }
  const unplaced = new Set(wave.unplaced.map((u) => u.order));
  const perTote = cart.maxLitres / cart.totes;
  let linesPlanned = 0;

  for (const trip of wave.trips) {
    let kg = 0;
    let litres = 0;
    const totes = new Set<number>();
    const expected = new Map<string, number>();
    const nodeOfBin = new Map<string, Set<number>>();
    for (const to of trip.orders) {
      seen.set(to.ref, (seen.get(to.ref) ?? 0) + 1);
      const o = byRef.get(to.ref);
      if (!o) {
        problems.push(`trip ${trip.n} carries unknown order ${to.ref}`);
        continue;
      }
      let ol = 0;
      for (const l of o.lines) {
        kg += l.qty * l.unitKg;
        ol += l.qty * l.unitLitres;
        const bin = l.bin ?? String(l.node);
        const k = lineKey(o.ref, l.sku, l.qty, bin);
        expected.set(k, (expected.get(k) ?? 0) + 1);
        if (!nodeOfBin.has(bin)) nodeOfBin.set(bin, new Set());
        nodeOfBin.get(bin)!.add(l.node);
      }
      litres += ol;
      // One tote per order unless its volume needs more (a cart profile: one order per tote).
      const need = Math.max(1, Math.ceil(ol / perTote - 1e-9));
      if (to.totes.length !== need) problems.push(`order ${to.ref} has ${to.totes.length} totes, needs ${need}`);
      for (const t of to.totes) {
        if (totes.has(t)) problems.push(`trip ${trip.n} gives tote ${t} twice`);
        if (!(t >= 1 && t <= cart.totes)) problems.push(`trip ${trip.n} uses tote ${t} outside 1..${cart.totes}`);
        totes.add(t);
      }
    }
    if (totes.size > cart.totes) problems.push(`trip ${trip.n} needs ${totes.size} totes > ${cart.totes}`);
    if (kg > cart.maxKg * (1 + 1e-12)) problems.push(`trip ${trip.n} weighs ${kg} kg > ${cart.maxKg}`);
    if (litres > cart.maxLitres * (1 + 1e-12)) problems.push(`trip ${trip.n} holds ${litres} L > ${cart.maxLitres}`);

    const tripRefs = new Map(trip.orders.map((o) => [o.ref, o]));
    const nodes = new Set<number>();
    let prev = input.depotNode;
    let metres = 0;
    trip.stops.forEach((s, i) => {
      if (s.n !== i + 1) problems.push(`trip ${trip.n} stop ${i} is numbered ${s.n}`);
      if (nodes.has(s.node)) problems.push(`trip ${trip.n} visits access point ${s.node} twice`);
      nodes.add(s.node);
      metres += input.distance(prev, s.node);
      prev = s.node;
      for (const bin of s.bins) {
        if (!nodeOfBin.get(bin)?.has(s.node)) problems.push(`trip ${trip.n} stop ${s.n}: bin ${bin} is not on this trip's orders at this access point`);
      }
      for (const l of s.lines) {
        linesPlanned++;
        const k = lineKey(l.order, l.sku, l.qty, l.bin);
        const left = expected.get(k) ?? 0;
        if (left === 0) problems.push(`trip ${trip.n} stop ${s.n} picks a line not on its orders: ${k}`);
        else expected.set(k, left - 1);
        if (!s.bins.includes(l.bin)) problems.push(`trip ${trip.n} stop ${s.n}: line bin ${l.bin} missing from the stop's bins`);
        if (!tripRefs.get(l.order)?.totes.includes(l.tote)) problems.push(`trip ${trip.n}: line of ${l.order} goes to tote ${l.tote}, not one of its own`);
      }
    });
    metres += input.distance(prev, input.depotNode);
    for (const [k, left] of expected) if (left > 0) problems.push(`trip ${trip.n} misses ${left} × line ${k}`);
    if (Math.abs(metres - trip.metres) > 1e-6 * Math.max(1, metres)) problems.push(`trip ${trip.n} says ${trip.metres} m, its stops walk ${metres} m`);
    if (trip.lowerBound > trip.metres + 1e-6) problems.push(`trip ${trip.n} lower bound ${trip.lowerBound} m exceeds its ${trip.metres} m`);
  }

  for (const o of orders) {
    const n = (seen.get(o.ref) ?? 0) + (unplaced.has(o.ref) ? 1 : 0);
    if (n !== 1) problems.push(`order ${o.ref} appears ${n} times among trips and unplaced`);
  }
  const linesIn = orders.filter((o) => !unplaced.has(o.ref)).reduce((s, o) => s + o.lines.length, 0);
  if (linesPlanned !== linesIn) problems.push(`${linesPlanned} lines planned for ${linesIn} lines of placed orders`);
  return problems;
}
