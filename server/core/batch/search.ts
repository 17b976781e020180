/**
 * Batching by search: iterated local search over batches, started from the Clarke–Wright savings
 * solution (./savings.ts), in the family of metaheuristics for order batching of Henn, Koch, Doerner,
 * Strauss & Wäscher (2010), BuR Business Research 3(1) (iterated local search), and Žulj, Kramer &
 * Schneider (2018), EJOR 264(2) (adaptive large neighbourhood search).
 *
 * Moves: shift one order to another trip, swap two orders of two trips, and — as the kick — remove a
 * few related orders (close to a random one) and reinsert them by regret (Ropke & Pisinger 2006,
 * Transportation Science 40(4)), opening a new trip only when none has room. Moves are ranked by
 * insertion estimates on each trip's current circuit (cheapest insertion of the new stops, the circuit
 * with the leaving stops skipped); only the few best are measured with the real router (best
 * construction + 2-opt / Or-opt, the wave's default routing), whose lengths are cached by order set.
 *
 * The search keeps the best wave seen, so it never returns a wave longer than savings under that
 * router. A kick is kept when the wave after local search is no longer than the current one plus a
 * threshold that shrinks to zero as the budget runs out (threshold accepting, Dueck & Scheuer 1990,
 * J. Computational Physics 90(1)). Randomness only through the seeded generator; time only through the
 * budget's clock, so a stepping clock gives the same wave for the same seed.
 */
import { matrixOf } from '../matrix';
import type { Rng } from '../rng';
import { solveTour } from '../tour/index';
import type { BatchContext, Load } from './context';
import { batchSavings } from './savings';

/** Moves per order measured with the real router after ranking by estimate. */
const EXACT_PER_ORDER = 3;
/** A move is measured only when its estimate is below this fraction of the two trips' length. */
const ESTIMATE_SLACK = 0.03;
/** Related orders kept per order for the kick (closest by stop-to-stop walking). */
const RELATED = 16;
/** Largest number of orders removed by one kick. */
const MAX_RUIN = 10;
/**
 * The router moves are measured with: repeated nearest neighbor + local search (the wave's default
 * routing without its sorted-edges construction, about half the cost). The final choice between the
 * search's best wave and savings' is measured with the wave's own routing.
 */
const ROUTER = 'repeated-nearest-neighbor';
/** Cached trip lengths before the cache is cleared (memory stays bounded on long runs). */
const CACHE_MAX = 200_000;

interface Trip {
  members: number[];
  kg: number;
  litres: number;
  totes: number;
  /** How many members visit each stop (local id → count). */
  count: Map<number, number>;
  /** Stops in visiting order from the router (depot excluded). */
  tour: Int32Array;
  length: number;
}

interface Routed {
  length: number;
  tour: Int32Array;
}

export interface SearchStats {
  /** Savings' wave and the search's best under the search's router, metres. */
  savingsLength: number;
  length: number;
  /** The same two under the wave's routing (best + local), metres; the returned wave is the shorter. */
  savingsWaveLength: number;
  waveLength: number;
  kicks: number;
  routed: number;
}

/**
 * Savings, then search until the budget ends. O(savings) plus, per local-search sweep, O(n · B · k · s)
 * estimates for n orders, B trips, k stops per trip and s per order, and a router call (O(k³) worst)
 * for each of the few best moves not already cached.
 */
export function batchSearch(ctx: BatchContext, rng: Rng, stats?: SearchStats): Load[] {
  const { needs, stops, table, cart, budget } = ctx;
  const n = needs.length;
  const clock = budget.clock;
  const t0 = clock();
  const start = batchSavings({ ...ctx, progress: (f) => ctx.progress(0.3 * f) });
  if (n < 2 || budget.expired() || budget.deadline === Infinity) return start;
  // The final comparison under the wave's routing needs a share of the budget: stop the search before it.
  const stopAt = budget.deadline - Math.min(0.1 * (budget.deadline - t0), 2 * start.length + 5);
  const timeUp = (): boolean => budget.expired() || clock() >= stopAt;
  const span = Math.max(1, budget.deadline - t0);
  const report = (): void => ctx.progress(Math.min(1, (clock() - t0) / span));

  // ---- the real router, cached by order set -------------------------------------------------
  const U = table.size;
  const mark = new Int32Array(U);
  let stamp = 0;
  const cache = new Map<string, Routed>();
  let routed = 0;
  const routeOf = (members: readonly number[]): Routed => {
    if (members.length === 0) return { length: 0, tour: new Int32Array(0) };
    const sorted = members.length === 1 ? members : [...members].sort((a, b) => a - b);
    const key = sorted.join(',');
    const hit = cache.get(key);
    if (hit) return hit;
    stamp++;
    const ids: number[] = [];
    for (const p of sorted) {
      for (const s of stops[p]!) {
        if (mark[s] !== stamp) {
          mark[s] = stamp;
          ids.push(s);
        }
      }
    }
    ids.sort((a, b) => a - b);
    const k = ids.length + 1;
    const d = new Float64Array(k * k);
    for (let i = 0; i < k; i++) {
      const a = i === 0 ? 0 : ids[i - 1]!;
      for (let j = i + 1; j < k; j++) {
        const v = table.d(a, ids[j - 1]!);
        d[i * k + j] = v;
        d[j * k + i] = v;
      }
    }
    const r = solveTour(matrixOf(k, d), { method: ROUTER, improve: 'local', timeLimitMs: Infinity });
    const tour = new Int32Array(k - 1);
    for (let i = 1; i < k; i++) tour[i - 1] = ids[r.order[i]! - 1]!;
    const out = { length: r.length, tour };
    if (cache.size >= CACHE_MAX) cache.clear();
    cache.set(key, out);
    routed++;
    return out;
  };

  // ---- state --------------------------------------------------------------------------------
  const assign = new Int32Array(n).fill(-1);
  let trips: Trip[] = [];
  const makeTrip = (members: number[]): Trip => {
    const t: Trip = { members: [], kg: 0, litres: 0, totes: 0, count: new Map(), tour: new Int32Array(0), length: 0 };
    for (const p of members) addMember(t, p);
    const r = routeOf(t.members);
    t.tour = r.tour;
    t.length = r.length;
    return t;
  };
  // Loads are summed afresh after each change, so rounding never drifts a trip past a limit.
  const resum = (t: Trip): void => {
    t.kg = 0;
    t.litres = 0;
    t.totes = 0;
    for (const q of t.members) {
      t.kg += needs[q]!.kg;
      t.litres += needs[q]!.litres;
      t.totes += needs[q]!.totes;
    }
  };
  const addMember = (t: Trip, p: number): void => {
    t.members.push(p);
    resum(t);
    for (const s of stops[p]!) t.count.set(s, (t.count.get(s) ?? 0) + 1);
  };
  const removeMember = (t: Trip, p: number): void => {
    const i = t.members.indexOf(p);
    t.members.splice(i, 1);
    resum(t);
    for (const s of stops[p]!) {
      const c = t.count.get(s)! - 1;
      if (c === 0) t.count.delete(s);
      else t.count.set(s, c);
    }
  };
  const setRoute = (t: Trip): void => {
    const r = routeOf(t.members);
    t.tour = r.tour;
    t.length = r.length;
  };
  const load = (groups: readonly (readonly number[])[]): void => {
    trips = groups.map((g) => makeTrip([...g]));
    trips.forEach((t, b) => {
      for (const p of t.members) assign[p] = b;
    });
  };
  const snapshot = (): number[][] => trips.map((t) => [...t.members]);
  const total = (): number => trips.reduce((s, t) => s + t.length, 0);

  load(start.map((l) => l.members));
  const savingsLength = total();
  let best = snapshot();
  let bestLength = savingsLength;
  let current = savingsLength;
  const eps = 1e-9 * Math.max(1, savingsLength);

  // ---- estimates ----------------------------------------------------------------------------
  /** Circuit length of `t` with the stops only `p` needs skipped. O(k). */
  const withoutEstimate = (t: Trip, p: number): number => {
    stamp++;
    for (const s of stops[p]!) if (t.count.get(s) === 1) mark[s] = stamp;
    let len = 0;
    let prev = 0;
    for (let i = 0; i < t.tour.length; i++) {
      const s = t.tour[i]!;
      if (mark[s] === stamp) continue;
      len += table.d(prev, s);
      prev = s;
    }
    return len + table.d(prev, 0);
  };
  /** Extra length of inserting `p`'s new stops into `t`'s circuit one by one, cheapest place each. O(k · s). */
  const insertEstimate = (t: Trip, p: number, skip = -1): number => {
    let extra = 0;
    const tour = t.tour;
    const k = tour.length;
    stamp++;
    if (skip >= 0) for (const s of stops[skip]!) if (t.count.get(s) === 1) mark[s] = stamp;
    for (const s of stops[p]!) {
      if (t.count.has(s) && mark[s] !== stamp) continue;
      let bestAdd = Infinity;
      let prev = 0;
      for (let i = 0; i <= k; i++) {
        const next = i === k ? 0 : tour[i]!;
        if (i < k && mark[next] === stamp) continue;
        const add = table.d(prev, s) + table.d(s, next) - table.d(prev, next);
        if (add < bestAdd) bestAdd = add;
        prev = next;
      }
      // The stop is now on the circuit for the next ones (approximately: counted at its cheapest place).
      extra += bestAdd;
    }
    return extra;
  };
  const fitsWith = (t: Trip, addP: number, removeP: number): boolean => {
    const a = needs[addP]!;
    const r = removeP >= 0 ? needs[removeP]! : null;
    return (
      t.totes + a.totes - (r ? r.totes : 0) <= cart.totes &&
      t.kg + a.kg - (r ? r.kg : 0) <= cart.maxKg &&
      t.litres + a.litres - (r ? r.litres : 0) <= cart.maxLitres
    );
  };

  // ---- related orders (for kicks and for which trips to try) ---------------------------------
  const related = relatedOrders(ctx, RELATED);

  // ---- local search: shift and swap, ranked by estimate, measured by the router --------------
  interface Cand {
    est: number;
    b: number;
    q: number;
  }
  const cands: Cand[] = [];
  /** Tries to improve around order p; applies the best measured improving move. True when one applied. */
  const improveOrder = (p: number): boolean => {
    const a = assign[p]!;
    const A = trips[a]!;
    const remA = withoutEstimate(A, p) - A.length;
    cands.length = 0;
    // Trips worth trying: those of p's related orders (plus none else: far trips never gain).
    const tried = new Set<number>();
    for (const q of related[p]!) {
      const b = assign[q]!;
      if (b === a) continue;
      const B = trips[b]!;
      if (!tried.has(b)) {
        tried.add(b);
        if (fitsWith(B, p, -1)) cands.push({ est: remA + insertEstimate(B, p), b, q: -1 });
      }
      // Swap p with q.
      if (fitsWith(B, p, q) && fitsWith(A, q, p)) {
        const est = remA + insertEstimate(A, q, p) + (withoutEstimate(B, q) - B.length) + insertEstimate(B, p, q);
        cands.push({ est, b, q });
      }
    }
    if (cands.length === 0) return false;
    cands.sort((x, y) => x.est - y.est || x.b - y.b || x.q - y.q);
    let bestDelta = -eps;
    let bestCand: Cand | null = null;
    const limit = Math.min(EXACT_PER_ORDER, cands.length);
    for (let c = 0; c < limit; c++) {
      const cand = cands[c]!;
      // Estimates overstate a move's cost by what re-routing recovers; far above zero, none gains.
      if (cand.est > ESTIMATE_SLACK * (A.length + trips[cand.b]!.length)) break;
      if (timeUp()) break;
      const B = trips[cand.b]!;
      const newA = A.members.filter((x) => x !== p);
      const newB = cand.q >= 0 ? B.members.filter((x) => x !== cand.q) : [...B.members];
      newB.push(p);
      if (cand.q >= 0) newA.push(cand.q);
      const delta = routeOf(newA).length + routeOf(newB).length - A.length - B.length;
      if (delta < bestDelta) {
        bestDelta = delta;
        bestCand = cand;
      }
    }
    if (!bestCand) return false;
    const B = trips[bestCand.b]!;
    removeMember(A, p);
    addMember(B, p);
    assign[p] = bestCand.b;
    if (bestCand.q >= 0) {
      removeMember(B, bestCand.q);
      addMember(A, bestCand.q);
      assign[bestCand.q] = a;
    }
    setRoute(A);
    setRoute(B);
    current += bestDelta;
    return true;
  };

  /** Local search from a queue of orders until none improves (or the budget ends). */
  const queue: number[] = [];
  const inQueue = new Uint8Array(n);
  const enqueueTrip = (t: Trip): void => {
    for (const p of t.members) {
      if (!inQueue[p]) {
        inQueue[p] = 1;
        queue.push(p);
      }
    }
  };
  const localSearch = (): void => {
    let steps = 0;
    while (queue.length > 0) {
      if (timeUp()) break;
      const p = queue.shift()!;
      inQueue[p] = 0;
      const a = assign[p]!;
      if (improveOrder(p)) {
        enqueueTrip(trips[a]!);
        enqueueTrip(trips[assign[p]!]!);
      }
      if ((++steps & 15) === 0) report();
    }
    queue.length = 0;
    inQueue.fill(0);
  };

  const all = Array.from({ length: n }, (_, p) => p);
  shuffle(all, rng);
  for (const p of all) {
    inQueue[p] = 1;
    queue.push(p);
  }
  localSearch();
  current = total();
  if (current < bestLength - eps) {
    bestLength = current;
    best = snapshot();
  }

  // ---- kicks: ruin a few related orders, recreate by regret, local search, threshold accept ----
  let kicks = 0;
  const threshold0 = 0.01 * savingsLength / Math.max(1, trips.length);
  while (!timeUp()) {
    kicks++;
    const before = snapshot();
    const beforeLength = current;
    // Ruin.
    const seed = rng.int(n);
    const size = Math.min(n, 2 + rng.int(MAX_RUIN - 1));
    const removed: number[] = [seed];
    const rel = related[seed]!;
    for (let i = 0; removed.length < size && i < rel.length; i++) {
      // Skip some at random so repeated kicks around one order differ.
      if (rng.next() < 0.3) continue;
      removed.push(rel[i]!);
    }
    const touched = new Set<number>();
    for (const p of removed) {
      const b = assign[p]!;
      removeMember(trips[b]!, p);
      assign[p] = -1;
      touched.add(b);
    }
    for (const b of touched) setRoute(trips[b]!);
    // Recreate by regret-2 on insertion estimates.
    const left = [...removed];
    while (left.length > 0) {
      let pick = -1;
      let pickBin = -1;
      let pickRegret = -Infinity;
      let pickCost = Infinity;
      for (let i = 0; i < left.length; i++) {
        const p = left[i]!;
        let b1 = -1;
        let c1 = Infinity;
        let c2 = Infinity;
        const seen = new Set<number>();
        for (const q of related[p]!) {
          const b = assign[q]!;
          if (b < 0 || seen.has(b)) continue;
          seen.add(b);
          const t = trips[b]!;
          if (!fitsWith(t, p, -1)) continue;
          const c = insertEstimate(t, p);
          if (c < c1) {
            c2 = c1;
            c1 = c;
            b1 = b;
          } else if (c < c2) c2 = c;
        }
        // Any trip with room, if no related trip has any.
        if (b1 < 0) {
          for (let b = 0; b < trips.length; b++) {
            const t = trips[b]!;
            if (!fitsWith(t, p, -1)) continue;
            const c = t.members.length === 0 ? routeOf([p]).length : insertEstimate(t, p);
            if (c < c1) {
              c2 = c1;
              c1 = c;
              b1 = b;
            } else if (c < c2) c2 = c;
          }
        }
        const regret = b1 < 0 ? Infinity : c2 - c1;
        if (regret > pickRegret || (regret === pickRegret && c1 < pickCost)) {
          pickRegret = regret;
          pickCost = c1;
          pick = i;
          pickBin = b1;
        }
      }
      const p = left.splice(pick, 1)[0]!;
      if (pickBin < 0) {
        // No trip has room: a new trip (every order fits an empty cart, see prepare.ts).
        trips.push(makeTrip([]));
        pickBin = trips.length - 1;
      }
      const t = trips[pickBin]!;
      addMember(t, p);
      assign[p] = pickBin;
      setRoute(t);
      touched.add(pickBin);
    }
    current = total();
    // Repair around the kick: the reinserted orders first; each improvement queues its two trips.
    for (const p of removed) {
      inQueue[p] = 1;
      queue.push(p);
    }
    localSearch();
    current = total();
    if (current < bestLength - eps) {
      bestLength = current;
      best = snapshot();
    }
    const elapsed = Math.min(1, (clock() - t0) / span);
    const threshold = threshold0 * (1 - elapsed);
    if (current > beforeLength + threshold) {
      load(before);
      current = beforeLength;
    } else if (trips.some((t) => t.members.length === 0)) {
      load(trips.filter((t) => t.members.length > 0).map((t) => t.members));
    }
    report();
  }
  if (stats) {
    stats.savingsLength = savingsLength;
    stats.length = bestLength;
    stats.kicks = kicks;
    stats.routed = routed;
  }
  // The wave is routed with best + local: keep savings' batches unless the search's are shorter under it.
  const waveLength = (groups: readonly (readonly number[])[]): number => {
    let sum = 0;
    for (const g of groups) if (g.length > 0) sum += waveRoute(ctx, g);
    return sum;
  };
  const startGroups = start.map((l) => l.members);
  const searchWave = waveLength(best);
  const savingsWave = waveLength(startGroups);
  if (stats) {
    stats.savingsWaveLength = savingsWave;
    stats.waveLength = Math.min(searchWave, savingsWave);
  }
  if (!(searchWave < savingsWave)) return start;
  return best
    .filter((g) => g.length > 0)
    .map((g) => {
      const l: Load = { members: [...g], kg: 0, litres: 0, totes: 0 };
      for (const p of g) {
        l.kg += needs[p]!.kg;
        l.litres += needs[p]!.litres;
        l.totes += needs[p]!.totes;
      }
      return l;
    });
}

/** Length of one batch's circuit with the wave's default routing (best + local), metres. */
function waveRoute(ctx: BatchContext, members: readonly number[]): number {
  const set = new Set<number>();
  for (const p of members) for (const s of ctx.stops[p]!) set.add(s);
  const ids = [...set].sort((a, b) => a - b);
  const k = ids.length + 1;
  const d = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    const a = i === 0 ? 0 : ids[i - 1]!;
    for (let j = i + 1; j < k; j++) {
      const v = ctx.table.d(a, ids[j - 1]!);
      d[i * k + j] = v;
      d[j * k + i] = v;
    }
  }
  return solveTour(matrixOf(k, d), { method: 'best', improve: 'local', timeLimitMs: Infinity }).length;
}

function shuffle(a: number[], rng: Rng): void {
  for (let i = a.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    const t = a[i]!;
    a[i] = a[j]!;
    a[j] = t;
  }
}

/**
 * Each order's `k` closest others by closeness (the sum over its stops of the walk to the other's
 * nearest stop, both ways; ties by position). O(n² · s²) table reads for s stops per order.
 */
function relatedOrders(ctx: BatchContext, k: number): Int32Array[] {
  const { stops, table } = ctx;
  const n = stops.length;
  const oneWay = (from: Int32Array, to: Int32Array): number => {
    let sum = 0;
    for (let i = 0; i < from.length; i++) {
      const s = from[i]!;
      let best = Infinity;
      for (let j = 0; j < to.length; j++) {
        const v = table.d(s, to[j]!);
        if (v < best) best = v;
      }
      sum += best;
    }
    return sum;
  };
  const kk = Math.min(k, n - 1);
  const out: Int32Array[] = [];
  const dist = new Float64Array(kk);
  for (let p = 0; p < n; p++) {
    // Out of time: the remaining orders keep no related list (the search then only kicks around the others).
    if ((p & 7) === 0 && ctx.budget.expired()) {
      out.push(new Int32Array(0));
      continue;
    }
    const list = new Int32Array(kk);
    let size = 0;
    for (let q = 0; q < n; q++) {
      if (q === p) continue;
      const v = oneWay(stops[p]!, stops[q]!) + oneWay(stops[q]!, stops[p]!);
      if (size === kk && !(v < dist[kk - 1]!)) continue;
      let i = size < kk ? size++ : kk - 1;
      while (i > 0 && dist[i - 1]! > v) {
        dist[i] = dist[i - 1]!;
        list[i] = list[i - 1]!;
        i--;
      }
      dist[i] = v;
      list[i] = q;
    }
    out.push(list);
  }
  return out;
}
