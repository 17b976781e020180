/**
 * Slotting on generated sites: a 20/80 popularity history over a random initial slotting. Each method
 * learns from the first two thirds of the days; the table shows the walking of the later days (orders
 * it never saw), before and after, with and without a budget of 60 moves, beside the plain
 * popularity-by-distance rule. `SLOTTING_BENCH_LONG=1` adds a larger site.
 */
import { buildDistanceIndex, pairDistance } from '../../server/core/plan/distances';
import { generateRectangularPlan, type RectangularPlanParams } from '../../server/core/plan/generate';
import { buildWalkGraph } from '../../server/core/plan/walk-graph';
import { createRng } from '../../server/core/rng';
import { generateSlottingScenario, slotBinsOf } from '../../server/core/slotting/generate';
import { planSlotting, type SlottingMethod } from '../../server/core/slotting/index';

interface Site {
  name: string;
  plan: RectangularPlanParams;
  skus: number;
  days: number;
  ordersPerDay: number;
  maxLines: number;
}

const SITES: Site[] = [
  {
    name: 'single block, 10 aisles',
    plan: { aisles: 10, aisleLengthM: 30, aisleSpacingM: 3, baysPerAisle: 15, levels: 3 },
    skus: 600,
    days: 15,
    ordersPerDay: 60,
    maxLines: 4,
  },
  {
    name: 'two blocks, 14 aisles',
    plan: { aisles: 14, aisleLengthM: 40, aisleSpacingM: 3.2, baysPerAisle: 20, levels: 3, crossAisles: { front: true, back: true, middle: 1 } },
    skus: 900,
    days: 15,
    ordersPerDay: 60,
    maxLines: 6,
  },
];
if (process.env.SLOTTING_BENCH_LONG) {
  SITES.push({
    name: 'three blocks, 24 aisles',
    plan: { aisles: 24, aisleLengthM: 60, aisleSpacingM: 3.2, baysPerAisle: 30, levels: 4, crossAisles: { front: true, back: true, middle: 2 } },
    skus: 3000,
    days: 21,
    ordersPerDay: 150,
    maxLines: 8,
  });
}

const fmt = (m: number) => `${Math.round(m).toLocaleString('en-GB')} m`;

export async function run(): Promise<void> {
  for (const site of SITES) {
    const plan = generateRectangularPlan(site.plan);
    const graph = buildWalkGraph(plan);
    const index = buildDistanceIndex(graph);
    const bins = slotBinsOf(plan, graph);
    const scenario = generateSlottingScenario({
      bins,
      skuCount: site.skus,
      days: site.days,
      ordersPerDay: site.ordersPerDay,
      maxLines: site.maxLines,
      rng: createRng(11),
    });
    console.log(
      `### ${site.name}: ${bins.length} bins, ${scenario.skus.length} SKUs, ${site.days} days × ${site.ordersPerDay} orders (1–${site.maxLines} lines), 8-tote carts, savings batching`,
    );
    console.log('| method | moves | later days before | later days after | saving | vs popularity rule | time |');
    console.log('|---|---:|---:|---:|---:|---:|---:|');
    let rule = NaN;
    for (const budget of [undefined, 60] as const) {
      for (const method of ['popularity', 'cube-per-order', 'search'] as SlottingMethod[]) {
        const t0 = performance.now();
        const r = planSlotting({
          bins,
          skus: scenario.skus,
          history: scenario.history,
          method,
          depotNode: graph.depotNode[0]!,
          distance: (a, b) => pairDistance(index, a, b),
          cart: { totes: 8, maxKg: 250, maxLitres: 600 },
          ...(budget !== undefined ? { maxMoves: budget } : {}),
          timeLimitMs: 8000,
        });
        const ms = performance.now() - t0;
        const t = r.figures.test;
        if (method === 'popularity' && budget === undefined) rule = t.metresAfter;
        const vsRule = ((t.metresAfter / rule - 1) * 100).toFixed(1);
        console.log(
          `| ${method}${budget !== undefined ? ` (≤ ${budget} moves)` : ''} | ${r.moves.length} | ${fmt(t.metresBefore)} | ${fmt(t.metresAfter)} | ${t.savingPct.toFixed(1)} % | ${Number(vsRule) > 0 ? '+' : ''}${vsRule} % | ${(ms / 1000).toFixed(1)} s |`,
        );
      }
    }
    console.log('');
  }
}
