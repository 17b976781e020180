/**
 * Clarke–Wright savings batching (G. Clarke & J. W. Wright, Operations Research 12(4), 1964, as
 * applied to order batching by de Koster, van der Poort & Wolters 1999, IJPR 37(7), their variant
 * that recomputes savings after every merge). Every order starts as its own cart; the saving of
 * carrying batches A and B together is s(A, B) = d(A) + d(B) − d(A ∪ B), d the nearest-neighbor
 * route length from the depot. Repeatedly merge the pair with the largest positive saving that fits
 * the cart, then compute the savings of the merged batch with the others.
 *
 * Pairs are only formed among neighbours: each order's NEIGHBOURS closest orders by closeness (the
 * sum over each order's stops of the walk to the other's nearest stop, both ways), so the work grows
 * with n · NEIGHBOURS rather than n². Waves of up to NEIGHBOURS + 1 orders get every pair.
 * The route length of each candidate union is kept with its pair, so a merge reuses it.
 * Once the budget is spent no new savings are computed; the pairs already known are still merged.
 */
import { MinHeap } from '../plan/heap';
import type { BatchContext, Load } from './context';
import { fits } from './context';
import { closeness, unionInto, unionSorted } from './route-length';

/** Partners per order considered for a saving. */
const NEIGHBOURS = 64;

interface Group {
  members: number[];
  stops: Int32Array;
  kg: number;
  litres: number;
  totes: number;
  length: number;
  alive: boolean;
}

/** O(n² · k² + n · NEIGHBOURS · m · k²) for n orders, k stops per candidate union and m merges per order. */
export function batchSavings(ctx: BatchContext): Load[] {
  const { needs, stops, table, cart, budget } = ctx;
  const n = needs.length;
  const groups: Group[] = [];
  const groupOf = new Int32Array(n);
  for (let p = 0; p < n; p++) {
    const need = needs[p]!;
    groups.push({ members: [p], stops: stops[p]!, kg: need.kg, litres: need.litres, totes: need.totes, length: table.routeLength(stops[p]!), alive: true });
    groupOf[p] = p;
  }

  const neighbours = neighbourLists(ctx);

  const pairA: number[] = [];
  const pairB: number[] = [];
  const pairLength: number[] = [];
  const heap = new MinHeap(1024);
  // One scratch array for every candidate union: only merged pairs keep theirs (rebuilt at the merge).
  let scratch = new Int32Array(64);
  const consider = (a: number, b: number): void => {
    const ga = groups[a]!;
    const gb = groups[b]!;
    if (!fits(ga, gb, cart)) return;
    if (scratch.length < ga.stops.length + gb.stops.length) scratch = new Int32Array(2 * (ga.stops.length + gb.stops.length));
    const length = table.routeLength(scratch.subarray(0, unionInto(ga.stops, gb.stops, scratch)));
    const saving = ga.length + gb.length - length;
    if (!(saving > 0)) return;
    heap.push(-saving, pairA.length);
    pairA.push(a);
    pairB.push(b);
    pairLength.push(length);
  };

  for (let p = 0; p < n && !budget.expired(); p++) {
    for (const q of neighbours[p]!) if (q > p || !neighbours[q]!.includes(p)) consider(p, q);
    ctx.progress((0.5 * (p + 1)) / n);
  }

  let merges = 0;
  while (heap.size > 0) {
    const id = heap.pop();
    const a = pairA[id]!;
    const b = pairB[id]!;
    const ga = groups[a]!;
    const gb = groups[b]!;
    if (!ga.alive || !gb.alive) continue;
    ga.alive = false;
    gb.alive = false;
    const c = groups.length;
    const members = [...ga.members, ...gb.members];
    groups.push({
      members,
      stops: unionSorted(ga.stops, gb.stops),
      kg: ga.kg + gb.kg,
      litres: ga.litres + gb.litres,
      totes: ga.totes + gb.totes,
      length: pairLength[id]!,
      alive: true,
    });
    for (const m of members) groupOf[m] = c;
    merges++;
    ctx.progress(0.5 + (0.5 * merges) / Math.max(1, n - 1));
    if (budget.expired()) continue;
    const partners = new Set<number>();
    for (const m of members) for (const q of neighbours[m]!) partners.add(groupOf[q]!);
    partners.delete(c);
    for (const g of [...partners].sort((x, y) => x - y)) consider(g, c);
  }

  const loads: Load[] = [];
  for (const g of groups) {
    if (!g.alive) continue;
    loads.push({ members: g.members, kg: g.kg, litres: g.litres, totes: g.totes });
  }
  return loads;
}

/**
 * Each order's closest orders (up to NEIGHBOURS) by symmetric closeness; ties by position.
 * O(n² · k²) table reads for k stops per order.
 */
function neighbourLists(ctx: BatchContext): number[][] {
  const { needs, stops, table } = ctx;
  const n = needs.length;
  const all = Array.from({ length: n }, (_, p) => p);
  if (n - 1 <= NEIGHBOURS) return all.map((p) => all.filter((q) => q !== p));
  const close = new Float64Array(n * n);
  for (let p = 0; p < n; p++) {
    const sp = stops[p]!;
    for (let q = p + 1; q < n; q++) {
      const v = closeness(table, sp, stops[q]!);
      close[p * n + q] = v;
      close[q * n + p] = v;
    }
  }
  const ids = new Int32Array(n);
  return all.map((p) => {
    for (let q = 0; q < n; q++) ids[q] = q;
    const row = close.subarray(p * n, (p + 1) * n);
    row[p] = Infinity;
    const sorted = ids.slice().sort((x, y) => row[x]! - row[y]! || x - y);
    return Array.from(sorted.subarray(0, NEIGHBOURS));
  });
}
