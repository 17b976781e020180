/**
 * Slotting: which SKU lives in which bin, chosen so that the site's own orders need less walking.
 *
 * Methods (published names kept):
 * - `popularity` — class-based storage by pick frequency: SKUs ranked by pick lines onto bins ranked by
 *   walking distance from the depot (Hausman, Schwarz & Graves 1976, Management Science 22(6)). For
 *   one-line trips this is optimal by the rearrangement inequality (Hardy, Littlewood & Pólya,
 *   *Inequalities*, 1934, §10.2): the largest frequencies meet the shortest distances.
 * - `cube-per-order` — Heskett's cube-per-order index (1963, Journal of Marketing 27(4)): space a SKU
 *   needs (here its unit volume) over its pick frequency, lowest index nearest the depot.
 * - `search` — starts from the better of the two (or from today's slotting under a move budget) and
 *   improves by moving and swapping SKUs, each candidate scored on the order-by-order routes of the
 *   learning days (so SKUs ordered together end up near each other), the result measured with the real
 *   batcher and router.
 *
 * With a move budget (a move is one SKU changing bin; a swap is two), moves with the most walking
 * saved per move go first. Pinned bins and their SKUs never move; a weight rule keeps heavy SKUs on low
 * levels; a bin holds one SKU after slotting.
 *
 * Honest figures: the history is split by day; methods learn from the first part and the saving is
 * also reported on the later days they did not see.
 */
import type { Cart } from '../batch/types';
import type { BatchingMethod } from '../batch/types';
import type { Clock } from '../clock';
import { defaultClock } from '../clock';
import type { HistoryOrder, PeriodFigures, SlotBin, SlotMove, SlotSku, SlottingFigures, SlottingMethod, WeightRule } from './types';
import { SLOTTING_METHODS } from './types';
import { walkHistory, type WalkContext } from './walk';

export * from './types';
export { walkHistory } from './walk';

export interface SlottingOptions {
  bins: readonly SlotBin[];
  skus: readonly SlotSku[];
  history: readonly HistoryOrder[];
  method: SlottingMethod;
  depotNode: number;
  /** Shortest walking distance in metres between two node ids; Infinity when no path. Symmetric. */
  distance: (a: number, b: number) => number;
  cart: Cart;
  /** Most SKUs that may change bin; none: no limit. */
  maxMoves?: number;
  weightRule?: WeightRule;
  /** Share of the history's days learnt from, the earliest ones; default 2/3. */
  learnFraction?: number;
  /** Batching used to measure walking before and after; default `savings`. */
  batching?: BatchingMethod;
  /** Walking speed for picker hours, metres per second; default 1.0 (common in order-picking studies). */
  walkingMps?: number;
  /** Budget of the search, milliseconds; default 5000. */
  timeLimitMs?: number;
  clock?: Clock;
  /** Fraction done, 0…1. */
  progress?: (fraction: number) => void;
}

export interface SlottingResult {
  method: SlottingMethod;
  moves: SlotMove[];
  /** SKU code → bin code after the moves, for every SKU with a bin after. */
  assignment: Map<string, string>;
  figures: SlottingFigures;
  /** Plain-language notes: skipped SKUs, rules that held a SKU back, fallbacks. */
  notes: string[];
  ms: number;
}

const NO = -1;

interface Model {
  bins: readonly SlotBin[];
  skus: readonly SlotSku[];
  /** Metres from the depot to each bin's access point; Infinity when not reachable. */
  binDepot: Float64Array;
  /** May the bin take part in moves? */
  binFree: Uint8Array;
  /** May the SKU move? */
  skuFree: Uint8Array;
  heavy: Uint8Array;
  /** Pick lines of each SKU on the learning days, and on all days. */
  learnPicks: Float64Array;
  allPicks: Float64Array;
  /** For each SKU, the learning orders (indices into `orderSkus`) holding it. */
  ordersOf: number[][];
  /** Distinct SKU indices of each learning order. */
  orderSkus: Int32Array[];
  /** 1 for learning orders kept to check the search's moves (the last third of the learning days). */
  checkOrder: Uint8Array;
  skuIndex: Map<string, number>;
  weightRule: WeightRule | undefined;
  /** Free bins, nearest the depot first (ties: lower level, then bin code). */
  binOrder: number[];
}

interface Slots {
  binOf: Int32Array;
  skuIn: Int32Array;
}

const cloneSlots = (s: Slots): Slots => ({ binOf: s.binOf.slice(), skuIn: s.skuIn.slice() });

/**
 * Chooses where each SKU should live and measures the walking before and after.
 * Cost: two to four history walks (see `walkHistory`) plus, for `search`, passes of O(S × C × R)
 * for S movable SKUs, C candidate bins each and R learning orders per SKU, within `timeLimitMs`.
 *
 * @throws RangeError for an unknown method or a bad option.
 */
export function planSlotting(opts: SlottingOptions): SlottingResult {
  const clock = opts.clock ?? defaultClock;
  const t0 = clock();
  if (!SLOTTING_METHODS.includes(opts.method)) throw new RangeError(`unknown slotting method '${String(opts.method)}'`);
  if (opts.maxMoves !== undefined && !(Number.isInteger(opts.maxMoves) && opts.maxMoves >= 0)) throw new RangeError('maxMoves must be a whole number ≥ 0');
  const learnFraction = opts.learnFraction ?? 2 / 3;
  if (!(learnFraction > 0 && learnFraction <= 1)) throw new RangeError('learnFraction must lie in (0, 1]');
  const report = opts.progress ?? (() => {});
  const notes: string[] = [];

  const days = [...new Set(opts.history.map((o) => o.day))].sort((a, b) => a - b);
  const learnDays = days.length <= 1 ? days.length : Math.max(1, Math.min(days.length - 1, Math.round(days.length * learnFraction)));
  const lastLearnDay = days[learnDays - 1] ?? -Infinity;
  const learn = opts.history.filter((o) => o.day <= lastLearnDay);
  const test = opts.history.filter((o) => o.day > lastLearnDay);
  if (days.length <= 1) notes.push('The history holds one day: there are no later days to test on, so only the learning figures exist.');

  const model = buildModel(opts, learn, notes);
  const today = initialSlots(model, notes);
  const budget = opts.maxMoves ?? Infinity;

  const unitOf = (sku: string) => {
    const i = model.skuIndex.get(sku);
    if (i === undefined) return null;
    const s = model.skus[i]!;
    return { kg: s.unitKg, litres: s.unitLitres };
  };
  const walkCtx: WalkContext = {
    depotNode: opts.depotNode,
    distance: opts.distance,
    cart: opts.cart,
    batching: opts.batching ?? 'savings',
    unitOf,
    batchTimeLimitMs: 2000,
    tripTimeLimitMs: 200,
    ...(opts.clock ? { clock: opts.clock } : {}),
  };
  const nodeFn = (slots: Slots) => (sku: string) => {
    const i = model.skuIndex.get(sku);
    if (i === undefined) return NO;
    const b = slots.binOf[i]!;
    return b < 0 ? NO : model.bins[b]!.node;
  };
  const walk = (orders: readonly HistoryOrder[], slots: Slots) => walkHistory(orders, nodeFn(slots), walkCtx).metres;

  const proxy = new OrderRoutes(model, opts.depotNode, opts.distance);
  const timeLimit = opts.timeLimitMs ?? 5000;
  const deadline = t0 + timeLimit;

  let chosen: Slots;
  if (opts.method === 'popularity' || opts.method === 'cube-per-order') {
    const target = rankedSlots(model, today, opts.method);
    chosen = budget === Infinity ? target : towardsTarget(model, today, target, budget, proxy, clock, deadline);
    report(0.5);
  } else {
    const pop = rankedSlots(model, today, 'popularity');
    const coi = rankedSlots(model, today, 'cube-per-order');
    let start: Slots;
    if (budget === Infinity) {
      const learnToday = walk(learn, today);
      const wPop = walk(learn, pop);
      const wCoi = walk(learn, coi);
      start = wPop <= wCoi ? pop : coi;
      if (Math.min(wPop, wCoi) > learnToday) start = today;
    } else {
      start = towardsTarget(model, today, pop, budget, proxy, clock, deadline);
    }
    report(0.3);
    const improved = improveBySearch(model, today, start, budget, proxy, clock, deadline, (f) => report(0.3 + 0.4 * f));
    // Never worse than where the search started, measured with the real batcher and router.
    chosen = walk(learn, improved) <= walk(learn, start) ? improved : start;
    if (chosen === start) notes.push('The search found no change that shortened the learning days\u2019 walking beyond its starting point.');
  }
  report(0.7);

  const speed = opts.walkingMps ?? 1.0;
  const period = (orders: readonly HistoryOrder[], nDays: number): PeriodFigures => {
    const before = walk(orders, today);
    const after = walk(orders, chosen);
    return {
      days: nDays,
      orders: orders.length,
      metresBefore: before,
      metresAfter: after,
      savingPct: before > 0 ? (1 - after / before) * 100 : 0,
      pickerHoursPerDay: nDays > 0 ? (before - after) / speed / 3600 / nDays : 0,
    };
  };
  const figLearn = period(learn, learnDays);
  report(0.8);
  const figTest = period(test, days.length - learnDays);
  report(0.9);
  const whole: PeriodFigures = {
    days: days.length,
    orders: opts.history.length,
    metresBefore: figLearn.metresBefore + figTest.metresBefore,
    metresAfter: figLearn.metresAfter + figTest.metresAfter,
    savingPct: 0,
    pickerHoursPerDay: 0,
  };
  whole.savingPct = whole.metresBefore > 0 ? (1 - whole.metresAfter / whole.metresBefore) * 100 : 0;
  whole.pickerHoursPerDay = days.length > 0 ? (whole.metresBefore - whole.metresAfter) / speed / 3600 / days.length : 0;

  const moves = movesBetween(model, today, chosen, proxy, Math.max(1, learnDays), days.length);
  const assignment = new Map<string, string>();
  chosen.binOf.forEach((b, s) => {
    if (b >= 0) assignment.set(model.skus[s]!.code, model.bins[b]!.code);
  });
  report(1);
  return { method: opts.method, moves, assignment, figures: { learn: figLearn, test: figTest, whole }, notes, ms: clock() - t0 };
}

function buildModel(opts: SlottingOptions, learn: readonly HistoryOrder[], notes: string[]): Model {
  const { bins, skus } = opts;
  const binIndex = new Map<string, number>();
  bins.forEach((b, i) => binIndex.set(b.code, i));
  const skuIndex = new Map<string, number>();
  skus.forEach((s, i) => skuIndex.set(s.code, i));
  const binDepot = new Float64Array(bins.length);
  const binFree = new Uint8Array(bins.length);
  bins.forEach((b, i) => {
    binDepot[i] = b.node < 0 ? Infinity : opts.distance(opts.depotNode, b.node);
    binFree[i] = b.pinned || !Number.isFinite(binDepot[i]!) ? 0 : 1;
  });
  const skuFree = new Uint8Array(skus.length);
  const heavy = new Uint8Array(skus.length);
  const holders = new Map<number, number>();
  skus.forEach((s, i) => {
    const b = s.bin === null ? undefined : binIndex.get(s.bin);
    if (b !== undefined) holders.set(b, (holders.get(b) ?? 0) + 1);
    heavy[i] = opts.weightRule && s.unitKg >= opts.weightRule.minUnitKg ? 1 : 0;
  });
  let shared = 0;
  skus.forEach((s, i) => {
    const b = s.bin === null ? undefined : binIndex.get(s.bin);
    if (b === undefined) {
      skuFree[i] = 1;
      return;
    }
    if (bins[b]!.pinned) return;
    if ((holders.get(b) ?? 0) > 1) {
      shared++;
      return;
    }
    skuFree[i] = 1;
  });
  // A bin shared by several SKUs today stays as it is: moving one of them would need a rule for the rest.
  holders.forEach((count, b) => {
    if (count > 1) binFree[b] = 0;
  });
  if (shared > 0) notes.push(`${shared} SKUs share a bin with another SKU today; they and their bins stay where they are.`);

  const learnPicks = new Float64Array(skus.length);
  const allPicks = new Float64Array(skus.length);
  for (const o of opts.history)
    for (const l of o.lines) {
      const i = skuIndex.get(l.sku);
      if (i !== undefined) allPicks[i]!++;
    }
  const orderSkus: Int32Array[] = [];
  const ordersOf: number[][] = skus.map(() => []);
  // The last third of the learning days (when there are three or more) checks the search's moves:
  // a move must not lengthen those days' orders, or it fits the rest by chance (overfitting).
  const learnDays = [...new Set(learn.map((o) => o.day))].sort((a, b) => a - b);
  const firstCheckDay = learnDays.length >= 3 ? learnDays[learnDays.length - Math.ceil(learnDays.length / 3)]! : Infinity;
  const check: number[] = [];
  for (const o of learn) {
    const set = new Set<number>();
    for (const l of o.lines) {
      const i = skuIndex.get(l.sku);
      if (i === undefined) continue;
      learnPicks[i]!++;
      set.add(i);
    }
    if (set.size === 0) continue;
    const k = orderSkus.length;
    orderSkus.push(Int32Array.from(set));
    check.push(o.day >= firstCheckDay ? 1 : 0);
    for (const i of set) ordersOf[i]!.push(k);
  }
  const binOrder = bins
    .map((_, i) => i)
    .filter((i) => binFree[i])
    .sort((a, b) => binDepot[a]! - binDepot[b]! || bins[a]!.level - bins[b]!.level || (bins[a]!.code < bins[b]!.code ? -1 : 1));
  return {
    bins,
    skus,
    binDepot,
    binFree,
    skuFree,
    heavy,
    learnPicks,
    allPicks,
    ordersOf,
    orderSkus,
    checkOrder: Uint8Array.from(check),
    skuIndex,
    weightRule: opts.weightRule,
    binOrder,
  };
}

function initialSlots(model: Model, notes: string[]): Slots {
  const binIndex = new Map<string, number>();
  model.bins.forEach((b, i) => binIndex.set(b.code, i));
  const binOf = new Int32Array(model.skus.length).fill(NO);
  const skuIn = new Int32Array(model.bins.length).fill(NO);
  let unknown = 0;
  model.skus.forEach((s, i) => {
    if (s.bin === null) return;
    const b = binIndex.get(s.bin);
    if (b === undefined) {
      unknown++;
      return;
    }
    binOf[i] = b;
    if (skuIn[b] === NO) skuIn[b] = i;
  });
  if (unknown > 0) notes.push(`${unknown} SKUs name a bin that is not on this plan; they are treated as having no bin.`);
  return { binOf, skuIn };
}

const allowed = (model: Model, sku: number, bin: number): boolean =>
  model.binFree[bin] === 1 && (!model.heavy[sku] || !model.weightRule || model.bins[bin]!.level <= model.weightRule.maxLevel);

/**
 * Full re-slotting by a ranking: movable SKUs with learnt picks, best key first, each into the nearest
 * free allowed bin (ties: lower level, then bin code). SKUs without picks keep their bin when it is
 * still free, else take what is left nearest first.
 */
function rankedSlots(model: Model, today: Slots, method: 'popularity' | 'cube-per-order'): Slots {
  const slots = cloneSlots(today);
  const movable: number[] = [];
  model.skus.forEach((_, s) => {
    if (model.skuFree[s] && model.learnPicks[s]! > 0) movable.push(s);
  });
  const key = (s: number): number => (method === 'popularity' ? -model.learnPicks[s]! : Math.max(model.skus[s]!.unitLitres, 1e-9) / model.learnPicks[s]!);
  movable.sort((a, b) => key(a) - key(b) || a - b);
  // Free every bin the movable SKUs hold, then fill bins nearest first.
  for (const s of movable) {
    const b = slots.binOf[s]!;
    if (b >= 0 && slots.skuIn[b] === s) slots.skuIn[b] = NO;
    slots.binOf[s] = NO;
  }
  const order = binsByDistance(model);
  for (const s of movable) {
    for (const b of order) {
      if (slots.skuIn[b] === NO && allowed(model, s, b)) {
        slots.skuIn[b] = s;
        slots.binOf[s] = b;
        break;
      }
    }
    // No allowed free bin left: back to its own bin (free again, since SKUs before it took others).
    if (slots.binOf[s] === NO) {
      const own = today.binOf[s]!;
      if (own >= 0 && slots.skuIn[own] === NO) {
        slots.skuIn[own] = s;
        slots.binOf[s] = own;
      }
    }
  }
  return slots;
}

/** Free bins nearest the depot first (ties: lower level, then bin code). */
const binsByDistance = (model: Model): readonly number[] => model.binOrder;

/**
 * Order-by-order circuits of the learning orders (nearest neighbour from the depot), the quick score
 * candidate moves are ranked by. Routing each order alone still sees which SKUs are ordered together.
 */
class OrderRoutes {
  private readonly cost: Float64Array;
  private readonly nodes: number[] = [];
  constructor(
    private readonly model: Model,
    private readonly depot: number,
    private readonly distance: (a: number, b: number) => number,
  ) {
    this.cost = new Float64Array(model.orderSkus.length);
  }

  reset(slots: Slots): void {
    for (let k = 0; k < this.cost.length; k++) this.cost[k] = this.route(k, slots, -1, -1, -1, -1);
  }

  /** Metres of order k's circuit, with SKU a moved to bin ba and SKU b to bin bb (−1: no change). */
  route(k: number, slots: Slots, a: number, ba: number, b: number, bb: number): number {
    const nodes = this.nodes;
    nodes.length = 0;
    for (const s of this.model.orderSkus[k]!) {
      const bin = s === a ? ba : s === b ? bb : slots.binOf[s]!;
      if (bin < 0) continue;
      const v = this.model.bins[bin]!.node;
      if (!nodes.includes(v)) nodes.push(v);
    }
    let at = this.depot;
    let total = 0;
    const left = nodes.slice();
    while (left.length > 0) {
      let best = 0;
      let bestD = Infinity;
      for (let i = 0; i < left.length; i++) {
        const d = this.distance(at, left[i]!);
        if (d < bestD) {
          bestD = d;
          best = i;
        }
      }
      total += bestD;
      at = left[best]!;
      left.splice(best, 1);
    }
    return total + (nodes.length > 0 ? this.distance(at, this.depot) : 0);
  }

  /** Change in summed order metres if SKU a goes to bin ba and SKU b (or −1) to bin bb. */
  delta(slots: Slots, a: number, ba: number, b: number, bb: number): number {
    const [all] = this.deltas(slots, a, ba, b, bb);
    return all;
  }

  /** The change over all learning orders, and over the check orders alone. */
  deltas(slots: Slots, a: number, ba: number, b: number, bb: number): [number, number] {
    let d = 0;
    let dc = 0;
    const seen = new Set<number>();
    for (const list of b >= 0 ? [this.model.ordersOf[a]!, this.model.ordersOf[b]!] : [this.model.ordersOf[a]!]) {
      for (const k of list) {
        if (seen.has(k)) continue;
        seen.add(k);
        const v = this.route(k, slots, a, ba, b, bb) - this.cost[k]!;
        d += v;
        if (this.model.checkOrder[k]) dc += v;
      }
    }
    return [d, dc];
  }

  commit(slots: Slots, a: number, b: number): void {
    const seen = new Set<number>();
    for (const list of b >= 0 ? [this.model.ordersOf[a]!, this.model.ordersOf[b]!] : [this.model.ordersOf[a]!]) {
      for (const k of list) {
        if (seen.has(k)) continue;
        seen.add(k);
        this.cost[k] = this.route(k, slots, -1, -1, -1, -1);
      }
    }
  }
}

interface Candidate {
  sku: number;
  bin: number;
  /** SKU in `bin` that swaps into the mover's old bin, or −1 for a free bin. */
  other: number;
  gain: number;
  /** Gain on the check orders alone. */
  checkGain: number;
  moves: number;
}

/** Moves of `sku` to `bin`: a free bin is one move, an occupied one a swap (two), when both sides allow it. */
function candidateOf(model: Model, slots: Slots, proxy: OrderRoutes, sku: number, bin: number): Candidate | null {
  const from = slots.binOf[sku]!;
  if (bin === from || !allowed(model, sku, bin)) return null;
  const other = slots.skuIn[bin]!;
  if (other === NO) {
    const [d, dc] = proxy.deltas(slots, sku, bin, -1, -1);
    return { sku, bin, other: NO, gain: -d, checkGain: -dc, moves: 1 };
  }
  if (!model.skuFree[other] || from < 0 || !allowed(model, other, from)) return null;
  const [d, dc] = proxy.deltas(slots, sku, bin, other, from);
  return { sku, bin, other, gain: -d, checkGain: -dc, moves: 2 };
}

function apply(slots: Slots, c: Candidate): void {
  const from = slots.binOf[c.sku]!;
  if (from >= 0 && slots.skuIn[from] === c.sku) slots.skuIn[from] = NO;
  if (c.other !== NO) {
    slots.binOf[c.other] = from;
    if (from >= 0) slots.skuIn[from] = c.other;
  }
  slots.binOf[c.sku] = c.bin;
  slots.skuIn[c.bin] = c.sku;
}

/** SKUs moved from `today` (a swap counts both). */
function movedCount(today: Slots, slots: Slots): number {
  let n = 0;
  for (let s = 0; s < slots.binOf.length; s++) if (slots.binOf[s] !== today.binOf[s]) n++;
  return n;
}

/**
 * Under a move budget: from `today`, take moves towards `target` one pass at a time, most walking saved
 * per move first (scored on order-by-order routes), until the budget or the deadline.
 */
function towardsTarget(model: Model, today: Slots, target: Slots, budget: number, proxy: OrderRoutes, clock: Clock, deadline: number): Slots {
  const slots = cloneSlots(today);
  proxy.reset(slots);
  for (let pass = 0; pass < 50; pass++) {
    const cands: Candidate[] = [];
    for (let s = 0; s < model.skus.length; s++) {
      const t = target.binOf[s]!;
      if (!model.skuFree[s] || t < 0 || t === slots.binOf[s]) continue;
      const c = candidateOf(model, slots, proxy, s, t);
      if (c && c.gain > 1e-9) cands.push(c);
    }
    if (!takeBest(model, today, slots, cands, budget, proxy) || clock() > deadline) break;
  }
  return slots;
}

/** Applies candidates best gain per move first, each re-scored just before; false when none applied. */
function takeBest(model: Model, today: Slots, slots: Slots, cands: Candidate[], budget: number, proxy: OrderRoutes, checked = false): boolean {
  cands.sort((a, b) => b.gain / b.moves - a.gain / a.moves || a.sku - b.sku);
  const touched = new Set<number>();
  let applied = false;
  for (const c of cands) {
    if (touched.has(c.sku) || (c.other !== NO && touched.has(c.other)) || touched.has(-1 - c.bin)) continue;
    const fresh = candidateOf(model, slots, proxy, c.sku, c.bin);
    if (!fresh || fresh.gain <= 1e-9 || (checked && fresh.checkGain < -1e-9)) continue;
    const before = movedCount(today, slots);
    const trial = cloneSlots(slots);
    apply(trial, fresh);
    if (movedCount(today, trial) > budget && movedCount(today, trial) > before) continue;
    apply(slots, fresh);
    proxy.commit(slots, fresh.sku, fresh.other);
    touched.add(fresh.sku);
    if (fresh.other !== NO) touched.add(fresh.other);
    touched.add(-1 - fresh.bin);
    applied = true;
  }
  return applied;
}

/**
 * Local search on order-by-order routes: for each movable SKU with picks, candidate bins are the
 * bins at the access points of the SKUs it is most often ordered with, and the nearest bins to the
 * depot; best gain per move first, passes until no gain, the budget or the deadline.
 */
function improveBySearch(
  model: Model,
  today: Slots,
  start: Slots,
  budget: number,
  proxy: OrderRoutes,
  clock: Clock,
  deadline: number,
  progress: (f: number) => void,
): Slots {
  const slots = cloneSlots(start);
  proxy.reset(slots);
  const nodeBins = new Map<number, number[]>();
  model.bins.forEach((b, i) => {
    if (!model.binFree[i]) return;
    const list = nodeBins.get(b.node);
    if (list) list.push(i);
    else nodeBins.set(b.node, [i]);
  });
  const near = binsByDistance(model).slice(0, 32);
  const movers = model.skus
    .map((_, s) => s)
    .filter((s) => model.skuFree[s] && model.learnPicks[s]! > 0)
    .sort((a, b) => model.learnPicks[b]! - model.learnPicks[a]! || a - b)
    .slice(0, 400);
  const partnersOf = (s: number): number[] => {
    const count = new Map<number, number>();
    for (const k of model.ordersOf[s]!) for (const t of model.orderSkus[k]!) if (t !== s) count.set(t, (count.get(t) ?? 0) + 1);
    return [...count.entries()]
      .sort((a, b) => b[1] - a[1] || a[0] - b[0])
      .slice(0, 4)
      .map(([t]) => t);
  };
  const t0 = clock();
  for (let pass = 0; pass < 20 && clock() < deadline; pass++) {
    const cands: Candidate[] = [];
    for (const s of movers) {
      if (clock() > deadline) break;
      const bins = new Set<number>(near);
      for (const t of partnersOf(s)) {
        const b = slots.binOf[t]!;
        if (b >= 0) for (const x of nodeBins.get(model.bins[b]!.node) ?? []) bins.add(x);
      }
      let best: Candidate | null = null;
      for (const b of bins) {
        const c = candidateOf(model, slots, proxy, s, b);
        if (c && c.gain > 1e-9 && c.checkGain >= -1e-9 && (!best || c.gain / c.moves > best.gain / best.moves)) best = c;
      }
      if (best) cands.push(best);
    }
    progress(Math.min(1, (clock() - t0) / Math.max(1, deadline - t0)));
    if (!takeBest(model, today, slots, cands, budget, proxy, true)) break;
  }
  progress(1);
  return slots;
}

/** The move list from `today` to `after`, estimated saving per move from order-by-order routes, biggest first. */
function movesBetween(model: Model, today: Slots, after: Slots, proxy: OrderRoutes, learnDays: number, allDays: number): SlotMove[] {
  proxy.reset(today);
  const moves: SlotMove[] = [];
  for (let s = 0; s < model.skus.length; s++) {
    const to = after.binOf[s]!;
    if (to === today.binOf[s] || to < 0) continue;
    // Saving this SKU's own orders see when it alone takes its new bin (others as today).
    const alone = -proxy.delta(today, s, to, -1, -1);
    const from = today.binOf[s]!;
    moves.push({
      sku: model.skus[s]!.code,
      fromBin: from >= 0 ? model.bins[from]!.code : null,
      toBin: model.bins[to]!.code,
      picksPerDay: allDays > 0 ? model.allPicks[s]! / allDays : 0,
      estSavingMPerDay: alone / learnDays,
    });
  }
  return moves.sort((a, b) => b.estSavingMPerDay - a.estSavingMPerDay || (a.sku < b.sku ? -1 : 1));
}
