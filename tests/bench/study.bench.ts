/**
 * The demo question as a study, in process: the demo hall's layout without its middle cross aisle,
 * four waves of 40 generated orders (1–5 lines, 20/80 skew), every routing and batching method, and
 * the what-if "middle cross aisle added". Target (our own): under 30 s on this machine, so an
 * engineer waits well under a minute for it in the browser. Prints total and per-method times.
 */
import { generateRectangularPlan } from '../../server/core/plan/generate';
import { engineParams } from '../../server/floor-plans/floor-plans.service';
import { DEMO_PLAN_PARAMS } from '../../server/floor-plans/demo-seed';
import { generateStudyOrders } from '../../server/studies/generate-orders';
import { runStudy } from '../../server/studies/study-engine';
import { ROUTING_METHOD_KEYS } from '../../shared/studies';

const TARGET_MS = 30_000;

export async function run(): Promise<void> {
  const params = { ...DEMO_PLAN_PARAMS, crossAisles: { ...DEMO_PLAN_PARAMS.crossAisles, middle: 0 } };
  const geometry = generateRectangularPlan(engineParams(params));
  const spec = { waves: 4, ordersPerWave: 40, linesMin: 1, linesMax: 5, skus: 600, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 3 };
  const waves = generateStudyOrders(geometry.bins, spec, 20261202).map((orders, i) => ({
    id: i + 1,
    name: `wave ${i + 1}`,
    orders,
    cart: { totes: 8, maxKg: 150, maxLitres: 400 },
  }));
  const t0 = performance.now();
  const r = runStudy({
    base: { geometry, closures: [], depotIdx: 0 },
    whatIfs: [{ label: 'Middle cross aisle added', changes: [{ kind: 'add_cross_aisle', yM: 24 }] }],
    waves,
    tripsFrom: 'savings',
    routing: [...ROUTING_METHOD_KEYS],
    batching: ['single', 'fcfs', 'seed', 'savings'],
    speeds: { walkingSpeedMps: 1, secondsPerLine: 10, secondsPerStop: 5 },
    dayScale: 2,
    seed: 20261202,
  });
  const ms = performance.now() - t0;
  console.log(`| plan | method | ms |\n|---|---|---|`);
  for (const v of r.variants) {
    for (const row of [...v.routing].sort((a, b) => b.ms - a.ms).slice(0, 6)) console.log(`| ${v.label} | ${row.key} | ${row.ms.toFixed(0)} |`);
    for (const b of v.batching) console.log(`| ${v.label} | batching ${b.method} (with bounds) | ${b.ms.toFixed(0)} |`);
  }
  // The demo question's figures: S-shape against the default method, without and with the middle cross aisle.
  console.log('\n| plan | method | metres | picker hours a day |\n|---|---|---:|---:|');
  for (const v of r.variants) {
    for (const row of v.routing.filter((x) => ['s-shape', 'largest-gap', 'best+local', 'ratliff-rosenthal'].includes(x.key))) {
      console.log(`| ${v.label} | ${row.key} | ${row.metres?.toFixed(1) ?? '—'} | ${row.hoursPerDay?.toFixed(2) ?? '—'} |`);
    }
  }
  console.log(
    `\nwhole study: ${(ms / 1000).toFixed(1)} s for ${r.variants.map((v) => v.trips.length).join(' + ')} trips (target < ${TARGET_MS / 1000} s): ${ms < TARGET_MS ? 'met' : 'NOT met'}`,
  );
}
