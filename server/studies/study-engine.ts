/**
 * The study computation: the same work (orders grouped in waves, or trips as recorded) on a base plan
 * and on what-if changes of it, routed by every chosen method and batched by every chosen batching
 * method, with Held–Karp bounds and hours at the site's speeds. The planning itself is the engine's
 * site model (server/core/site: build, slot, route); this file orchestrates it. Imports only the engine
 * and pure helpers, so the worker and the tests call this very function.
 *
 * Reproducible: every budget inside runs on a step counter (`stepClock`), not on wall time, so the
 * same inputs and seed give the same figures on any machine and under any load. Only the compute
 * times (`ms`) are wall-clock.
 */
import { batchOrders } from '../core/batch/index';
import type { Cart, Order } from '../core/batch/types';
import type { Clock } from '../core/clock';
import type { DistanceMatrix } from '../core/matrix';
import type { PlanClosure, PlanGeometry } from '../core/plan/types';
import { isNotApplicable } from '../core/policy/types';
import {
  buildSiteModel,
  closedWalkMetres,
  routeTrip as routeOnModel,
  SiteModelError,
  slotOrders,
  slotReason,
  tripMatrixOf,
  walkPolyline,
  type SiteModel,
  type TripRoute,
} from '../core/site/index';
import { HELD_KARP_MAX_POINTS, heldKarpBound, solveTour } from '../core/tour/index';
import { estimateMinutes, type PlannerOrder, type SiteSpeeds } from '../waves/wave-planner';
import { BATCHING_LABELS, type BatchingName } from '../../shared/waves';
import { summariseReplications } from './replications';
import {
  DEFAULT_ROUTING,
  ROUTING_LABELS,
  type BatchingRow,
  type PlanChange,
  type RecordedWaveRow,
  type RoutingMethodKey,
  type RoutingRow,
  type StudyResults,
  type StudyTrip,
  type StudyVariant,
  type WhatIf,
  type WhatIfRow,
} from '../../shared/studies';

/** A clock that advances one unit per reading: budgets become step counts, the same on every run. */
export function stepClock(): Clock {
  let t = 0;
  return () => ++t;
}

/** Budgets in steps of `stepClock`. Deep search reads the clock a few times per kick. */
export const DEEP_STEPS = 1500;
const BOUND_STEPS = 400;
/** Effectively unlimited, but finite where a method insists on a finite budget. */
const UNLIMITED_STEPS = 1e12;
/** Budget of the `search` batching in steps (it searches until its budget ends). */
export const SEARCH_STEPS = 6000;

export interface StudyPlanInput {
  geometry: PlanGeometry;
  closures: PlanClosure[];
  depotIdx: number;
}

export interface RecordedTrip {
  /** Order refs carried. */
  orders: string[];
  /** Bin codes of each planned stop, in planned order. */
  stopBins: string[][];
  lines: number;
  plannedMetres: number;
  /** Stored walked metres when the picking side saved them, else null. */
  walkedMetres: number | null;
  /** Bin codes of each confirmed stop, in the order the picker confirmed them. */
  confirmedBins: string[][];
}

export interface StudyWave {
  id: number;
  name: string;
  orders: PlannerOrder[];
  cart: Cart;
  /** Present for recorded waves: the trips as released. */
  recorded?: RecordedTrip[];
}

/** A what-if as the engine gets it: on a candidate layout when `layout` is given, else on the base plan. */
export type StudyWhatIf = WhatIf & { layout?: StudyPlanInput };

export interface StudyEngineInput {
  base: StudyPlanInput;
  whatIfs: StudyWhatIf[];
  waves: StudyWave[];
  /** Trips compared by the routing methods: as recorded, or batched by this method. */
  tripsFrom: 'recorded' | BatchingName;
  routing: RoutingMethodKey[];
  batching: BatchingName[];
  speeds: SiteSpeeds;
  dayScale: number;
  seed: number;
  /** Further replications of generated work: the same scenario drawn with another seed (waves of that draw). */
  replicas?: { seed: number; waves: StudyWave[] }[];
  progress?: (fraction: number, phase: string) => void;
}

export class StudyInputError extends Error {
  /** The input it concerns, relative to the what-if (e.g. `changes.0.xM`), when one field is at fault. */
  readonly field: string | null;
  constructor(message: string, field: string | null = null) {
    super(message);
    this.field = field;
    this.name = 'StudyInputError';
  }
}

/**
 * The plan with what-if changes applied: aisle stretches closed, cross aisles added across every
 * aisle, the depot moved. Bins stay where they are. Throws StudyInputError for a change that names no
 * aisle or falls outside the plan. O(aisles + changes).
 */
export function applyChanges(base: StudyPlanInput, changes: readonly PlanChange[]): StudyPlanInput {
  const geometry: PlanGeometry = { ...base.geometry, crossAisles: [...base.geometry.crossAisles], depots: [...base.geometry.depots] };
  const closures = [...base.closures];
  const xs = geometry.aisles.map((a) => a.x);
  const ys = geometry.aisles.flatMap((a) => [a.yStart, a.yEnd]);
  const [xMin, xMax, yMin, yMax] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  // The plan's extent: its aisles, cross aisles and depots. A depot moved outside it could not be walked to.
  const allX = [...xs, ...geometry.crossAisles.flatMap((c) => [c.xStart, c.xEnd]), ...geometry.depots.map((d) => d.x)];
  const allY = [...ys, ...geometry.crossAisles.map((c) => c.y), ...geometry.depots.map((d) => d.y)];
  const [pxMin, pxMax, pyMin, pyMax] = [Math.min(...allX), Math.max(...allX), Math.min(...allY), Math.max(...allY)];
  let added = 0;
  changes.forEach((c, j) => {
    if (c.kind === 'close_aisle') {
      const aisle = geometry.aisles.find((a) => a.code === c.aisle);
      if (!aisle)
        throw new StudyInputError(
          `aisle ${c.aisle} is not on the plan (aisles ${geometry.aisles[0]?.code ?? ''}–${geometry.aisles.at(-1)?.code ?? ''})`,
          `changes.${j}.aisle`,
        );
      if (!(c.toM > c.fromM)) throw new StudyInputError(`the closed stretch of aisle ${c.aisle} must end after it starts`, `changes.${j}.toM`);
      closures.push({ kind: 'aisle', code: c.aisle, from: c.fromM, to: c.toM });
    } else if (c.kind === 'add_cross_aisle') {
      if (!(c.yM > yMin && c.yM < yMax))
        throw new StudyInputError(`a cross aisle at y = ${c.yM} m lies outside the aisles (y ${yMin}–${yMax} m)`, `changes.${j}.yM`);
      const there = geometry.crossAisles.find((x) => Math.abs(x.y - c.yM) < 0.5);
      if (there) throw new StudyInputError(`the plan already has a cross aisle at y = ${there.y} m; choose another place`, `changes.${j}.yM`);
      geometry.crossAisles.push({ code: `added-${++added}`, y: c.yM, xStart: xMin, xEnd: xMax });
    } else {
      const depot = geometry.depots[base.depotIdx];
      if (!depot) throw new StudyInputError('the plan has no depot to move', `changes.${j}`);
      if (!(c.xM >= pxMin && c.xM <= pxMax))
        throw new StudyInputError(`the depot at x = ${c.xM} m would lie outside the plan (x ${pxMin}–${pxMax} m)`, `changes.${j}.xM`);
      if (!(c.yM >= pyMin && c.yM <= pyMax))
        throw new StudyInputError(`the depot at y = ${c.yM} m would lie outside the plan (y ${pyMin}–${pyMax} m)`, `changes.${j}.yM`);
      geometry.depots[base.depotIdx] = { code: depot.code, x: c.xM, y: c.yM };
    }
  });
  return { geometry, closures, depotIdx: base.depotIdx };
}

/** A study's plan (base or what-if) as a site model, with the input it was built from. */
export interface BuiltPlan extends SiteModel {
  input: StudyPlanInput;
}

/** The site model of a plan (O(bins log bins + hubs² log hubs), ~70 ms at 2,880 bins). */
export function buildPlan(input: StudyPlanInput): BuiltPlan {
  try {
    const model = buildSiteModel({ geometry: input.geometry, closures: input.closures, depotIdx: input.depotIdx, distanceOptions: { budgetMs: 120_000 } });
    return Object.assign(model, { input });
  } catch (e) {
    if (e instanceof SiteModelError) throw new StudyInputError(e.message);
    throw e;
  }
}

export type RouteAnswer = TripRoute;

/**
 * One trip (`nodes` ascending, the depot not among them) routed by one method on the study's step-clock
 * budgets (../core/site/route.ts). The product's default (best + local) also restarts local search from
 * the S-shape order on block layouts, as the wave planner does, so studies and released waves agree.
 */
export function routeTrip(plan: BuiltPlan, nodes: readonly number[], m: DistanceMatrix, key: RoutingMethodKey, seed: number): RouteAnswer {
  return routeOnModel(plan, nodes, key, {
    matrix: m,
    seed,
    clock: stepClock,
    timeLimitMs: UNLIMITED_STEPS,
    deepTimeLimitMs: DEEP_STEPS,
    restartFromSShape: key === DEFAULT_ROUTING,
  });
}

/** Metres no circuit through the trip can beat: Held–Karp's optimum up to 16 stops, else its 1-tree bound. */
export function tripBound(m: DistanceMatrix, bestKnown: number): number {
  if (m.n <= 1) return 0;
  if (m.n <= HELD_KARP_MAX_POINTS) return solveTour(m, { method: 'exact', clock: stepClock(), timeLimitMs: UNLIMITED_STEPS }).length;
  return heldKarpBound(m, { upperBound: bestKnown, clock: stepClock(), timeLimitMs: BOUND_STEPS }).lowerBound;
}

/** Engine orders of a wave on a plan; orders that cannot be slotted on it are returned as unplaced. */
function engineOrders(plan: BuiltPlan, orders: readonly PlannerOrder[]): { orders: Order[]; unplaced: { order: string; reason: string }[] } {
  const r = slotOrders(plan, orders);
  return { orders: r.orders, unplaced: r.unslotted.map((u) => ({ order: u.order, reason: u.reason })) };
}

interface WorkTrip {
  wave: number;
  orders: number;
  lines: number;
  nodes: number[];
}

/** Trips of one wave by a batching method: distinct stop nodes (ascending) per batch. */
function batchWave(
  plan: BuiltPlan,
  orders: Order[],
  cart: Cart,
  method: BatchingName,
  wave: number,
): { trips: WorkTrip[]; unplaced: { order: string; reason: string }[] } {
  const r = batchOrders({
    orders,
    cart,
    method,
    depotNode: plan.depotNode,
    distance: plan.distance,
    clock: stepClock(),
    timeLimitMs: method === 'search' ? SEARCH_STEPS : UNLIMITED_STEPS,
  });
  const trips = r.batches.map((b) => {
    const nodes = new Set<number>();
    let lines = 0;
    for (const i of b.orders)
      for (const l of orders[i]!.lines) {
        nodes.add(l.node);
        lines++;
      }
    return { wave, orders: b.orders.length, lines, nodes: [...nodes].filter((v) => v !== plan.depotNode).sort((a, b2) => a - b2) };
  });
  return { trips, unplaced: r.unplaced.map((u) => ({ order: u.order, reason: u.reason })) };
}

/**
 * Depot + stops matrix of a trip. A pair no walk joins would send the tour and bound searches into
 * endless work (it once took the whole server down), so it stops the study with a plain message instead.
 */
function matrixOfTrip(plan: BuiltPlan, nodes: readonly number[]): DistanceMatrix {
  const m = tripMatrixOf(plan, nodes);
  for (let i = 0; i < m.d.length; i++) {
    if (!Number.isFinite(m.d[i]!)) throw new StudyInputError('a trip holds a stop no walk from the depot reaches; the study cannot route it');
  }
  return m;
}

/** One entry per order: the first reason met (batching and the recorded trips may both report it). */
function oncePerOrder(list: readonly { order: string; reason: string }[]): { order: string; reason: string }[] {
  const seen = new Set<string>();
  return list.filter((u) => !seen.has(u.order) && seen.add(u.order));
}
/** A routing row's figures before they are known (or when the method does not apply). */
const NO_FIGURES = { metres: null, metresPerTrip: null, metresPerLine: null, aboveBestPct: null, aboveBoundPct: null, hours: null, hoursPerDay: null } as const;
const pct = (a: number, b: number): number => (b > 0 ? (a / b - 1) * 100 : 0);
const hoursOf = (trips: readonly { lines: number; stops: number; metres: number }[], s: SiteSpeeds): number =>
  trips.reduce((h, t) => h + estimateMinutes(t.metres, t.lines, t.stops, s) / 60, 0);

/**
 * Runs the whole study, once per replication (the first on `waves` and `seed`, then each replica),
 * progress counting replications. The results are the first replication's, with every replication's
 * figures, means and intervals in `replications` when there is more than one.
 */
export function runStudy(input: StudyEngineInput): StudyResults {
  const runs = [{ seed: input.seed, waves: input.waves }, ...(input.replicas ?? [])];
  const report = input.progress ?? (() => {});
  const results = runs.map((r, i) => {
    const one = runOnce({
      ...input,
      ...r,
      progress: (f, phase) =>
        report(runs.length === 1 ? f : (i + f) / runs.length, runs.length === 1 ? phase : `Replication ${i + 1} of ${runs.length} (seed ${r.seed}): ${phase}`),
    });
    // Only the first replication's trips are kept (tables of trips, maps); the others give their totals.
    return i === 0 ? one : { ...one, variants: one.variants.map((v) => ({ ...v, trips: [] })) };
  });
  const first = results[0]!;
  if (results.length === 1) return first;
  report(1, 'done');
  return {
    ...first,
    notes: [...new Set(results.flatMap((r) => r.notes))],
    replications: summariseReplications(results),
    ms: results.reduce((s, r) => s + r.ms, 0),
  };
}

/** One replication. Cost: per plan, the build plus (methods × trips) routings and one bound per trip. */
function runOnce(input: StudyEngineInput): StudyResults {
  const t0 = performance.now();
  const report = input.progress ?? (() => {});
  const notes: string[] = [];
  const variantsIn: { key: string; label: string; changes: PlanChange[]; on: StudyPlanInput; layoutId: number | null }[] = [
    { key: 'base', label: 'Plan as it is', changes: [], on: input.base, layoutId: null },
    ...input.whatIfs.map((w, i) => ({
      key: `what-if-${i + 1}`,
      label: w.label,
      changes: w.changes,
      on: w.layout ?? input.base,
      layoutId: w.layout ? (w.layoutId ?? null) : null,
    })),
  ];
  const routingKeys = [...new Set<RoutingMethodKey>([...input.routing, DEFAULT_ROUTING])];
  const tripCount = input.waves.reduce((s, w) => s + (w.recorded?.length ?? w.orders.length), 0);
  const unitsPerVariant = 1 + input.batching.length * Math.max(1, tripCount / 4) + tripCount;
  let done = 0;
  const tick = (units: number, phase: string) => {
    done += units;
    report(Math.min(0.99, done / (unitsPerVariant * variantsIn.length)), phase);
  };

  const variants: StudyVariant[] = [];
  let recorded: RecordedWaveRow[] | null = null;
  for (const v of variantsIn) {
    const planInput = v.changes.length ? applyChanges(v.on, v.changes) : v.on;
    const plan = buildPlan(planInput);
    tick(1, `${v.label}: walk graph built`);
    const unplaced: { order: string; reason: string }[] = [];
    const ordersByWave = input.waves.map((w) => {
      const r = engineOrders(plan, w.orders);
      unplaced.push(...r.unplaced);
      return r.orders;
    });

    // Batching table: every method, each trip routed by the default method.
    const batching: BatchingRow[] = [];
    const batchedTrips = new Map<BatchingName, WorkTrip[]>();
    for (const method of input.batching) {
      const tb = performance.now();
      const trips: WorkTrip[] = [];
      // Half of a method's share of progress is its batching, wave by wave; the other half its routing.
      const share = Math.max(1, tripCount / 4);
      input.waves.forEach((w, wi) => {
        const r = batchWave(plan, ordersByWave[wi]!, w.cart, method, wi + 1);
        trips.push(...r.trips);
        if (method === input.batching[0]) unplaced.push(...r.unplaced);
        tick(share / 2 / input.waves.length, `${v.label}: batching by ${BATCHING_LABELS[method]}, wave ${wi + 1} of ${input.waves.length}`);
      });
      batchedTrips.set(method, trips);
      let metres = 0;
      let bound = 0;
      const figures = trips.map((t) => {
        const m = matrixOfTrip(plan, t.nodes);
        const len = routeTrip(plan, t.nodes, m, DEFAULT_ROUTING, input.seed).length!;
        metres += len;
        bound += tripBound(m, len);
        return { lines: t.lines, stops: t.nodes.length, metres: len };
      });
      const hours = hoursOf(figures, input.speeds);
      const lines = trips.reduce((s, t) => s + t.lines, 0);
      batching.push({
        method,
        label: BATCHING_LABELS[method],
        trips: trips.length,
        orders: trips.reduce((s, t) => s + t.orders, 0),
        lines,
        metres,
        metresPerTrip: trips.length ? metres / trips.length : 0,
        metresPerLine: lines ? metres / lines : 0,
        aboveBestPct: 0,
        aboveBoundPct: pct(metres, bound),
        hours,
        hoursPerDay: hours * input.dayScale,
        ms: performance.now() - tb,
      });
      tick(share / 2, `${v.label}: batching by ${BATCHING_LABELS[method]}, trips routed`);
    }
    const bestBatch = Math.min(...batching.map((b) => b.metres));
    for (const b of batching) b.aboveBestPct = pct(b.metres, bestBatch);

    // The trips the routing methods are compared on.
    let work: WorkTrip[];
    if (input.tripsFrom === 'recorded') {
      work = [];
      input.waves.forEach((w, wi) => {
        const orderOf = new Map(w.orders.map((o) => [o.ref, o]));
        (w.recorded ?? []).forEach((t, ti) => {
          const nodes = new Set<number>();
          const cutBins = new Set<string>();
          let missing = 0;
          let cutStops = 0;
          for (const bins of t.stopBins) {
            let cut = false;
            for (const b of bins) {
              const node = plan.binNode(b);
              if (node === undefined) missing++;
              else if (!plan.reachesDepot(node)) {
                cutBins.add(b);
                cut = true;
              } else if (node !== plan.depotNode) nodes.add(node);
            }
            if (cut) cutStops++;
          }
          if (missing) notes.push(`${v.label}: ${missing} bin(s) of a trip of ${w.name} are not on this plan and were left out`);
          // A stop a closure cuts off is an unreachable stop: its lines leave the trip and its orders are
          // reported with the same reason batching gives, so the what-if is not compared like for like.
          let lines = t.lines;
          if (cutStops) {
            for (const ref of t.orders) {
              const lost = orderOf.get(ref)?.lines.filter((l) => cutBins.has(l.bin)) ?? [];
              if (!lost.length) continue;
              lines -= lost.length;
              unplaced.push({ order: ref, reason: slotReason('unreachable', lost[0]!.bin, lost[0]!.sku) });
            }
            notes.push(
              `${v.label}: ${cutStops} stop(s) of trip ${ti + 1} of ${w.name} cannot be reached from the depot (cut off by a closed stretch) and were left out of its route`,
            );
          }
          work.push({ wave: wi + 1, orders: t.orders.length, lines: Math.max(0, lines), nodes: [...nodes].sort((a, b) => a - b) });
        });
      });
    } else {
      work = batchedTrips.get(input.tripsFrom) ?? [];
      if (!batchedTrips.has(input.tripsFrom)) {
        input.waves.forEach((w, wi) => work.push(...batchWave(plan, ordersByWave[wi]!, w.cart, input.tripsFrom as BatchingName, wi + 1).trips));
      }
    }

    const ms = new Map<RoutingMethodKey, number>(routingKeys.map((k) => [k, 0]));
    // Why each method failed on each trip; only the first reason per method reaches the table.
    const tripReasons: Record<string, string>[] = [];
    const trips: StudyTrip[] = work.map((t, ti) => {
      const m = matrixOfTrip(plan, t.nodes);
      const metres: Record<string, number | null> = {};
      const visits: Record<string, number[]> = {};
      const reasons: Record<string, string> = {};
      for (const key of routingKeys) {
        const tr = performance.now();
        const r = routeTrip(plan, t.nodes, m, key, input.seed);
        ms.set(key, ms.get(key)! + performance.now() - tr);
        metres[key] = r.length;
        visits[key] = r.visits;
        if (r.reason) reasons[key] = r.reason;
      }
      const known = Object.values(metres).filter((x): x is number => x !== null);
      const lowerBound = tripBound(m, Math.min(...known));
      tripReasons.push(reasons);
      // The routing share was sized on orders (trips are not known before batching): spread it over the trips.
      tick(
        tripCount / Math.max(1, work.length),
        `${v.label}: wave ${t.wave} of ${input.waves.length}, trip ${ti + 1} of ${work.length} routed by ${routingKeys.length} methods`,
      );
      return { n: ti + 1, wave: t.wave, orders: t.orders, lines: t.lines, nodes: t.nodes, lowerBound, metres, visits };
    });
    const lowerBound = trips.reduce((s, t) => s + t.lowerBound, 0);
    const lines = trips.reduce((s, t) => s + t.lines, 0);
    const routing: RoutingRow[] = routingKeys
      .filter((k) => input.routing.includes(k) || k === DEFAULT_ROUTING)
      .map((key) => {
        const missing = trips.filter((t) => t.metres[key] === null);
        const row: RoutingRow = {
          key,
          label: ROUTING_LABELS[key],
          applicable: missing.length === 0 && trips.length > 0,
          reason: null,
          ...NO_FIGURES,
          ms: ms.get(key)!,
          solved: null,
        };
        if (key === 'exact' && missing.length && trips.length > 0) {
          // Held–Karp on the trips it can solve; the others (too many stops) at their lower bound.
          const per = trips.map((t) => t.metres[key] ?? t.lowerBound);
          const metres = per.reduce((s, x) => s + x, 0);
          const hours = hoursOf(
            trips.map((t, i) => ({ lines: t.lines, stops: t.nodes.length, metres: per[i]! })),
            input.speeds,
          );
          const solved = trips.length - missing.length;
          return {
            ...row,
            solved,
            metres,
            metresPerTrip: metres / trips.length,
            metresPerLine: lines ? metres / lines : 0,
            aboveBoundPct: pct(metres, lowerBound),
            hours,
            hoursPerDay: hours * input.dayScale,
            reason: `solved ${solved} of ${trips.length} trips exactly; the other ${missing.length} (${tripReasons[missing[0]!.n - 1]![key] ?? 'too many stops'}) are counted at their lower bound, so this total is a lower bound too`,
          };
        }
        if (missing.length) {
          const why = tripReasons[missing[0]!.n - 1]![key] ?? 'does not apply';
          row.reason = missing.length === trips.length ? why : `${missing.length} of ${trips.length} trips: ${why}`;
          return row;
        }
        const metres = trips.reduce((s, t) => s + t.metres[key]!, 0);
        const hours = hoursOf(
          trips.map((t) => ({ lines: t.lines, stops: t.nodes.length, metres: t.metres[key]! })),
          input.speeds,
        );
        return {
          ...row,
          metres,
          metresPerTrip: trips.length ? metres / trips.length : 0,
          metresPerLine: lines ? metres / lines : 0,
          aboveBoundPct: pct(metres, lowerBound),
          hours,
          hoursPerDay: hours * input.dayScale,
        };
      });
    // A partly solved exact row is a bound, not a route: it is not "the best".
    const best = Math.min(...routing.filter((r) => r.metres !== null && r.solved === null).map((r) => r.metres!));
    for (const r of routing) if (r.metres !== null) r.aboveBestPct = pct(r.metres, best);

    if (v.key === 'base' && input.tripsFrom === 'recorded') recorded = recordedRows(plan, input.waves, trips);
    variants.push({
      key: v.key,
      label: v.label,
      changes: v.changes,
      layoutId: v.layoutId,
      layout: {
        aisles: planInput.geometry.aisles.length,
        crossAisles: planInput.geometry.crossAisles.length,
        bins: planInput.geometry.bins.length,
        blocks: isNotApplicable(plan.layout) ? null : plan.layout.blocks,
        policyNote: isNotApplicable(plan.layout) ? plan.layout.reason : null,
      },
      depotNode: plan.depotNode,
      routing,
      batching,
      trips,
      unplaced: oncePerOrder(unplaced),
      lowerBound,
      lines,
    });
  }

  report(1, 'done');
  return {
    seed: input.seed,
    speeds: { walkingSpeedMps: input.speeds.walkingSpeedMps, secondsPerLine: input.speeds.secondsPerLine, secondsPerStop: input.speeds.secondsPerStop },
    cart: input.waves[0]?.cart ?? { totes: 0, maxKg: 0, maxLitres: 0 },
    dayScale: input.dayScale,
    defaultRouting: DEFAULT_ROUTING,
    variants,
    whatIf: whatIfRows(variants),
    recorded,
    notes: [...new Set(notes)],
    ms: performance.now() - t0,
    replications: null,
  };
}

/** Per method and per batching method: each what-if against the plan as it is. */
function whatIfRows(variants: StudyVariant[]): WhatIfRow[] {
  const base = variants[0];
  if (!base) return [];
  const rows: WhatIfRow[] = [];
  for (const v of variants.slice(1)) {
    // Orders unreachable on one plan leave it with less work: a difference would not be like for like.
    const unlike = (a: number, b: number) =>
      a === b
        ? null
        : `the plans carry different work (${b} lines here, ${a} on the plan as it is; ${v.unplaced.length} order(s) cannot be placed): compare metres per line instead`;
    for (const r of v.routing) {
      const b = base.routing.find((x) => x.key === r.key);
      // A method that does not apply on either plan gives no difference: the row says why.
      const why =
        r.metres === null && b && b.metres === null
          ? `does not apply on either plan: ${r.reason ?? 'no route'}`
          : r.metres === null
            ? `does not apply on the what-if: ${r.reason ?? 'no route'}`
            : b && b.metres === null
              ? `does not apply on the plan as it is: ${b.reason ?? 'no route'}`
              : r.solved !== null || (b && b.solved !== null)
                ? 'Held–Karp solved only part of the trips: a difference of lower bounds'
                : null;
      rows.push(diffRow(v, r.key, r.label, b?.metres ?? null, r.metres, b?.hoursPerDay ?? null, r.hoursPerDay, why ?? unlike(base.lines, v.lines)));
    }
    for (const r of v.batching) {
      const b = base.batching.find((x) => x.method === r.method);
      rows.push(
        diffRow(
          v,
          `batching:${r.method}`,
          `${r.label} (routed by the default method)`,
          b?.metres ?? null,
          r.metres,
          b?.hoursPerDay ?? null,
          r.hoursPerDay,
          unlike(b?.lines ?? 0, r.lines),
        ),
      );
    }
  }
  return rows;
}

function diffRow(
  v: StudyVariant,
  method: string,
  methodLabel: string,
  baseMetres: number | null,
  metres: number | null,
  baseHours: number | null,
  hours: number | null,
  note: string | null,
): WhatIfRow {
  const both = note === null && baseMetres !== null && metres !== null;
  return {
    variant: v.key,
    label: v.label,
    method,
    methodLabel,
    baseMetres,
    metres,
    deltaMetres: both ? metres - baseMetres : null,
    deltaPct: both ? pct(metres, baseMetres) : null,
    deltaHoursPerDay: both && baseHours !== null && hours !== null ? hours - baseHours : null,
    note,
  };
}

/** Recorded waves: planned metres against the walk as confirmed, and the default method today. */
function recordedRows(plan: BuiltPlan, waves: readonly StudyWave[], trips: readonly StudyTrip[]): RecordedWaveRow[] {
  return waves.map((w, wi) => {
    const rec = w.recorded ?? [];
    let plannedConfirmed = 0;
    let walked = 0;
    let confirmed = 0;
    for (const t of rec) {
      if (t.confirmedBins.length === 0 && t.walkedMetres === null) continue;
      confirmed++;
      plannedConfirmed += t.plannedMetres;
      walked += t.walkedMetres ?? confirmedWalk(plan, t.confirmedBins);
    }
    const mine = trips.filter((t) => t.wave === wi + 1);
    const defaults = mine.map((t) => t.metres[DEFAULT_ROUTING] ?? null);
    return {
      waveId: w.id,
      name: w.name,
      trips: rec.length,
      confirmedTrips: confirmed,
      plannedMetres: rec.reduce((s, t) => s + t.plannedMetres, 0),
      plannedConfirmedMetres: plannedConfirmed,
      walkedMetres: confirmed ? walked : null,
      walkedAbovePlannedPct: confirmed && plannedConfirmed > 0 ? pct(walked, plannedConfirmed) : null,
      defaultMetres: defaults.every((d) => d !== null) ? defaults.reduce<number>((s, d) => s + d!, 0) : null,
    };
  });
}

/** Depot → each confirmed stop in confirmation order → depot, on the plan's shortest walking distances. */
export function confirmedWalk(plan: BuiltPlan, confirmedBins: readonly string[][]): number {
  const nodes: number[] = [];
  for (const bins of confirmedBins) {
    // A stop cut off since it was picked has no walk to measure on today's plan: left out.
    const node = bins.map((b) => plan.binNode(b)).find((n) => n !== undefined && plan.reachesDepot(n));
    if (node !== undefined) nodes.push(node);
  }
  return closedWalkMetres(plan.depotNode, nodes, plan.distance);
}

/** Polyline and numbered stops of one trip by one method, for the side-by-side maps. */
export function tripRoute(
  plan: BuiltPlan,
  trip: StudyTrip,
  key: RoutingMethodKey,
  seed: number,
): { points: { x: number; y: number }[]; stops: { n: number; x: number; y: number }[]; metres: number | null; reason: string | null } {
  const m = matrixOfTrip(plan, trip.nodes);
  const r = routeTrip(plan, trip.nodes, m, key, seed);
  if (r.length === null) return { points: [], stops: [], metres: null, reason: r.reason };
  const g = plan.graph;
  const stops = r.visits.map((k, i) => ({ n: i + 1, x: g.x[trip.nodes[k]!]!, y: g.y[trip.nodes[k]!]! }));
  if (r.path) return { points: r.path, stops, metres: r.length, reason: null };
  const poly = walkPolyline(
    plan,
    r.visits.map((k) => trip.nodes[k]!),
  );
  const points: { x: number; y: number }[] = [];
  for (let i = 0; i + 1 < poly.length; i += 2) points.push({ x: poly[i]!, y: poly[i + 1]! });
  return { points, stops, metres: r.length, reason: null };
}
