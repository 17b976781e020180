/**
 * Order batching: which orders share a cart trip. Grouping orders into carts so that total walking
 * is least is NP-hard (N. Gademann & S. van de Velde, IIE Transactions 37(1), 2005), so every method
 * here is a heuristic; de Koster, van der Poort & Wolters (1999), IJPR 37(7), compare them.
 *
 * Guarantees, whatever the method and the budget: no batch exceeds the cart's totes, kg or litres;
 * every order a cart can carry is in exactly one batch; every other order is in `unplaced` with a
 * reason. Deterministic: ties go to FCFS order, then input order.
 */
import type { Clock } from '../clock';
import { defaultClock } from '../clock';
import { budgetOf } from '../tour/budget';
import type { BatchContext } from './context';
import { toBatches } from './context';
import { prepareOrders } from './prepare';
import { NodeTable } from './route-length';
import { batchSavings } from './savings';
import { batchSearch } from './search';
import type { SearchStats } from './search';
import { createRng } from '../rng';
import { batchSeed } from './seed';
import { batchFcfs, batchSingle } from './simple';
import type { Batch, BatchingMethod, Cart, Order, OrderNeed, SeedRule, Unplaced } from './types';
import { BATCHING_METHODS, SEED_RULES } from './types';

export * from './types';
export { NodeTable } from './route-length';
export { totesNeeded, toteLitres } from './prepare';
export type { SearchStats } from './search';

export interface BatchOrdersOptions {
  orders: readonly Order[];
  cart: Cart;
  method: BatchingMethod;
  /** Walk-graph node id of the depot every trip starts and ends at. */
  depotNode: number;
  /** Shortest walking distance in metres between two node ids; Infinity when no path. Symmetric. */
  distance: (a: number, b: number) => number;
  /** Seed rule for `seed`; default `farthest`. */
  seedRule?: SeedRule;
  /**
   * Milliseconds for seed and savings to search (when spent they finish with cheaper choices), and the
   * time `search` improves on savings for (it always uses all of it). Default 2000.
   */
  timeLimitMs?: number;
  /** Seed of `search`'s random choices; default 1. Same seed, same budget outcome → same batches. */
  seed?: number;
  /** Filled with `search`'s figures (lengths under its router, kicks, router calls) when given. */
  searchStats?: SearchStats;
  clock?: Clock;
  /** Fraction of batching done, 0…1, called a few hundred times at most. */
  progress?: (fraction: number) => void;
}

export interface BatchOrdersResult {
  batches: Batch[];
  unplaced: Unplaced[];
  /** Distances among the depot (local id 0) and every access point of the placed orders. */
  table: NodeTable;
  needs: OrderNeed[];
  /** True when the budget ran out and the method finished with cheaper choices. */
  budgetExpired: boolean;
  ms: number;
}

/** Default search budget of seed and savings, milliseconds. */
export const DEFAULT_BATCH_TIME_LIMIT_MS = 2000;

/**
 * Groups orders into cart batches by `method`. Complexity: single and FCFS O(n log n); seed and
 * savings see their modules. Distances are read once per pair of access points (O(U²) for U points,
 * up to 2,048 kept in a table). An empty wave gives no batches.
 *
 * @throws RangeError for an unknown method or seed rule, or a cart without positive limits.
 */
export function batchOrders(opts: BatchOrdersOptions): BatchOrdersResult {
  const clock = opts.clock ?? defaultClock;
  const t0 = clock();
  if (!BATCHING_METHODS.includes(opts.method)) throw new RangeError(`unknown batching method '${String(opts.method)}'`);
  const seedRule = opts.seedRule ?? 'farthest';
  if (!SEED_RULES.includes(seedRule)) throw new RangeError(`unknown seed rule '${String(seedRule)}'`);
  const budget = budgetOf({ timeLimitMs: opts.timeLimitMs ?? DEFAULT_BATCH_TIME_LIMIT_MS, clock });
  const { depotNode, distance } = opts;
  const reach = new Map<number, boolean>();
  const reachable = (node: number): boolean => {
    let r = reach.get(node);
    if (r === undefined) {
      r = Number.isFinite(distance(depotNode, node));
      reach.set(node, r);
    }
    return r;
  };
  const { needs, unplaced } = prepareOrders(opts.orders, opts.cart, reachable);
  const table = new NodeTable(
    depotNode,
    needs.flatMap((nd) => [...nd.nodes]),
    distance,
  );
  const stops = needs.map((nd) => Int32Array.from(nd.nodes, (v) => table.localOf(v)).sort());
  const report = opts.progress ?? (() => {});
  let last = -1;
  const ctx: BatchContext = {
    needs,
    stops,
    table,
    cart: opts.cart,
    orders: opts.orders,
    budget,
    // At most about 200 calls, so a worker posting each one stays cheap.
    progress: (f) => {
      const step = Math.floor(f * 200);
      if (step > last) {
        last = step;
        report(Math.min(1, f));
      }
    },
  };
  const loads =
    opts.method === 'single'
      ? batchSingle(ctx)
      : opts.method === 'fcfs'
        ? batchFcfs(ctx)
        : opts.method === 'seed'
          ? batchSeed(ctx, seedRule)
          : opts.method === 'savings'
            ? batchSavings(ctx)
            : batchSearch(ctx, createRng(opts.seed ?? 1), opts.searchStats);
  ctx.progress(1);
  return {
    batches: toBatches(ctx, loads),
    unplaced,
    table,
    needs,
    budgetExpired: (opts.method === 'seed' || opts.method === 'savings') && budget.expired(),
    ms: clock() - t0,
  };
}
