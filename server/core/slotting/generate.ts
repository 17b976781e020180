/**
 * Generated slotting scenarios for studies, benchmarks and tests: a rectangular plan, a SKU master
 * slotted at random, and a history of orders whose SKU popularity follows a 20/80 curve.
 */
import type { PlanGeometry } from '../plan/types';
import type { WalkGraph } from '../plan/walk-graph';
import type { Rng } from '../rng';
import type { HistoryOrder, SlotBin, SlotSku } from './types';

/** Every bin of a plan as a slot, with its access-point node from the walk graph (−1 when it has none). */
export function slotBinsOf(plan: PlanGeometry, graph: WalkGraph, pinned: ReadonlySet<string> = new Set()): SlotBin[] {
  return plan.bins.map((b, i) => ({ code: b.code, node: graph.binNode[i]!, level: b.level, ...(pinned.has(b.code) ? { pinned: true } : {}) }));
}

/**
 * Share of picks drawn by the most popular share x of SKUs: F(x) = (1 + A)x / (A + x), the ABC
 * curve used in the storage literature (Bender 1981, from memory). A = 1/15 gives F(0.2) = 0.8:
 * 20 % of the SKUs draw 80 % of the picks.
 */
export const ABC_20_80 = 1 / 15;

/** The SKU rank (0 = most popular) of a uniform draw u, inverting the ABC curve for `n` SKUs. */
export function abcRank(u: number, n: number, a = ABC_20_80): number {
  const x = (a * u) / (1 + a - u);
  return Math.min(n - 1, Math.floor(x * n));
}

export interface SlottingScenarioParams {
  bins: readonly SlotBin[];
  /** SKUs to create, at most the number of bins; each gets a random bin. */
  skuCount: number;
  days: number;
  ordersPerDay: number;
  /** Lines per order, uniform in 1…maxLines. */
  maxLines: number;
  /** Share of SKUs weighing 15 kg or more per unit (for the weight rule); default 0.1. */
  heavyShare?: number;
  rng: Rng;
}

export interface SlottingScenario {
  skus: SlotSku[];
  history: HistoryOrder[];
}

/**
 * A SKU master slotted at random over the given bins (popularity unrelated to place, as in a site
 * that never slotted), and `days × ordersPerDay` orders drawing SKUs by the 20/80 curve, no SKU twice
 * in one order. SKU popularity ranks are shuffled against SKU codes.
 */
export function generateSlottingScenario(p: SlottingScenarioParams): SlottingScenario {
  const { rng } = p;
  const usable = p.bins.filter((b) => b.node >= 0);
  const n = Math.min(p.skuCount, usable.length);
  const binPick = shuffle(
    usable.map((_, i) => i),
    rng,
  );
  const heavyShare = p.heavyShare ?? 0.1;
  const skus: SlotSku[] = Array.from({ length: n }, (_, i) => {
    const heavy = rng.next() < heavyShare;
    return {
      code: `SKU-${String(i + 1).padStart(5, '0')}`,
      bin: usable[binPick[i]!]!.code,
      unitKg: heavy ? 15 + Math.round(rng.next() * 100) / 10 : Math.round((0.1 + rng.next() * 4) * 10) / 10,
      unitLitres: Math.round((0.2 + rng.next() * 8) * 10) / 10,
    };
  });
  const byRank = shuffle(
    skus.map((_, i) => i),
    rng,
  );
  const history: HistoryOrder[] = [];
  for (let d = 0; d < p.days; d++) {
    for (let k = 0; k < p.ordersPerDay; k++) {
      const lineCount = 1 + rng.int(Math.max(1, p.maxLines));
      const seen = new Set<number>();
      const lines = [];
      for (let t = 0; t < lineCount * 4 && lines.length < lineCount; t++) {
        const s = byRank[abcRank(rng.next(), n)]!;
        if (seen.has(s)) continue;
        seen.add(s);
        lines.push({ sku: skus[s]!.code, qty: 1 + rng.int(3) });
      }
      history.push({ ref: `H-${d + 1}-${k + 1}`, day: d, lines });
    }
  }
  return { skus, history };
}

function shuffle<T>(a: T[], rng: Rng): T[] {
  for (let i = a.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    [a[i], a[j]] = [a[j]!, a[i]!];
  }
  return a;
}
