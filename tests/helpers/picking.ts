/**
 * Released waves for picking tests, made by inserting rows the way a release stores them: a small
 * generated plan, orders with lines, trips with stops in a tour-engine circuit and their pick lines.
 * No Vitest imports: the browser test and the load test use it on a database file too.
 */
import type { Knex } from 'knex';
import { pairDistance, tripMatrix } from '../../server/core/plan/distances';
import { solveTour } from '../../server/core/tour/index';
import { BUILD_BUDGET_MS, runBuild } from '../../server/floor-plans/build';
import { activatePlan, engineParams, saveBuiltPlan } from '../../server/floor-plans/floor-plans.service';
import { unpackPlan } from '../../server/floor-plans/packed-plan';
import { loadPlanIndex } from '../../server/floor-plans/plan-index';
import { estimateMinutes } from '../../server/waves/wave-planner';
import type { GeneratePlanParams } from '../../shared/floor-plans';

/** 6 aisles of 12 bays, both sides, one level (144 bins), front and back cross aisles. */
export const SMALL_PLAN: GeneratePlanParams = {
  aisles: 6,
  aisleLengthM: 24,
  aisleSpacingM: 3.2,
  baysPerAisle: 12,
  levels: 1,
  bothSides: true,
  crossAisles: { front: true, back: true, middle: 0 },
  crossAisleWidthM: 3,
  depot: 'front_centre',
};

/** Builds, saves and activates a generated plan; returns its id. */
export async function seedPlan(db: Knex, siteId: number, userId: number, params: GeneratePlanParams = SMALL_PLAN): Promise<number> {
  const built = await runBuild({ kind: 'generate', params: engineParams(params), closures: [], budgetMs: BUILD_BUDGET_MS });
  const planId = await saveBuiltPlan(
    db,
    { siteId, userId, name: 'Picking test hall', source: 'generated', sourceFilename: null, generatorParams: params, warnings: [] },
    unpackPlan(built.plan!),
    built,
  );
  await activatePlan(db, siteId, planId, userId);
  return planId;
}

const ITEMS = [
  'Hex bolts M8, box of 50',
  'Cable ties 200 mm, pack of 100',
  'Packing tape 48 mm',
  'Work gloves, size 9',
  'LED bulb E27 9 W',
  'Brass hinge 75 mm',
  'Wall plugs 6 mm, pack of 200',
  'Spirit level 60 cm',
  'Masking tape 25 mm',
  'Wood screws 4 × 40 mm',
];

export interface TestTripSpec {
  /** Stops on the trip (each a distinct access point). */
  stops: number;
  /** Every `twoLineEvery`-th stop carries a second line (another order, same SKU). 0: never. */
  twoLineEvery?: number;
  due?: string | null;
  pickerId?: number | null;
}

export interface TestWave {
  waveId: number;
  planId: number;
  tripIds: number[];
  orderIds: number[];
}

let serial = 0;

/**
 * Inserts a released wave on the site's plan with the given trips. Bins are taken in a spread order
 * from the plan so trips differ; stops of each trip are sequenced by the tour engine from the depot.
 */
export async function insertReleasedWave(
  db: Knex,
  opts: { siteId: number; planId: number; createdBy: number; trips: TestTripSpec[]; name?: string; binOffset?: number },
): Promise<TestWave> {
  serial += 1;
  const plan = await loadPlanIndex(db, opts.planId);
  const site = (await db('sites').where({ id: opts.siteId }).first<{ walking_speed_mps: number; seconds_per_line: number; seconds_per_stop: number }>())!;
  const speeds = { walkingSpeedMps: site.walking_speed_mps, secondsPerLine: site.seconds_per_line, secondsPerStop: site.seconds_per_stop };
  // One bin per access point, in a stride order so consecutive trips spread over the hall.
  const byNode = new Map<number, number>();
  plan.geometry.bins.forEach((_b, i) => {
    const node = plan.graph.binNode[i]!;
    if (node >= 0 && !byNode.has(node)) byNode.set(node, i);
  });
  const slots = [...byNode.entries()];
  const stride = 7;
  const pickSlot = (k: number) => slots[(k * stride + (opts.binOffset ?? 0)) % slots.length]!;
  const depotNode = plan.depotNodes[0]!;
  const now = new Date().toISOString();
  const [{ id: waveId }] = await db('waves').insert(
    {
      site_id: opts.siteId,
      plan_id: opts.planId,
      name: opts.name ?? `Test wave ${serial}`,
      status: 'released',
      cart_name: 'Standard cart (8 totes)',
      cart_totes: 8,
      cart_max_kg: 150,
      cart_max_litres: 400,
      batching: 'fcfs',
      routing_method: 'best',
      routing_improve: 'local',
      depot_idx: 0,
      orders_count: 0,
      lines_count: 0,
      planned_metres: 0,
      lower_bound_metres: 0,
      single_metres: 0,
      est_seconds: 0,
      release_key: `test-release-${serial}-${Date.now()}`,
      created_by: opts.createdBy,
      created_at: now,
    },
    'id',
  );
  const tripIds: number[] = [];
  const orderIds: number[] = [];
  let slotCursor = 0;
  let totalMetres = 0;
  let totalLines = 0;
  let totalSeconds = 0;
  for (const [ti, spec] of opts.trips.entries()) {
    const chosen = Array.from({ length: spec.stops }, () => pickSlot(slotCursor++));
    const nodes = [depotNode, ...chosen.map(([node]) => node)];
    const tour = solveTour(tripMatrix(plan.index, nodes), { method: 'best', improve: 'local', timeLimitMs: 500 });
    const ordered = tour.order.slice(1).map((i) => chosen[i - 1]!);
    const refs = [`T${serial}-${ti + 1}-A`, `T${serial}-${ti + 1}-B`];
    const ids: number[] = [];
    for (const ref of refs) {
      const [{ id }] = await db('orders').insert(
        {
          site_id: opts.siteId,
          ref,
          status: 'planned',
          due: spec.due ?? null,
          priority: null,
          source: 'test',
          lines: 0,
          units: 0,
          weight_kg: 0,
          volume_l: 0,
          wave_id: waveId,
          created_at: now,
        },
        'id',
      );
      ids.push(id!);
    }
    orderIds.push(...ids);
    const lines = ordered.length + (spec.twoLineEvery ? Math.floor(ordered.length / spec.twoLineEvery) : 0);
    const estSeconds = estimateMinutes(tour.length, lines, ordered.length, speeds) * 60;
    const [{ id: tripId }] = await db('trips').insert(
      {
        wave_id: waveId,
        site_id: opts.siteId,
        n: ti + 1,
        status: spec.pickerId ? 'assigned' : 'released',
        picker_id: spec.pickerId ?? null,
        planned_metres: tour.length,
        lower_bound_metres: tour.length * 0.95,
        est_seconds: estSeconds,
        totes: 2,
        kg: 5,
        litres: 20,
        depot_node: depotNode,
        due: spec.due ?? null,
        assigned_at: spec.pickerId ? now : null,
      },
      'id',
    );
    tripIds.push(tripId!);
    if (spec.pickerId) await db('trip_assignments').insert({ trip_id: tripId, picker_id: spec.pickerId, assigned_by: opts.createdBy, assigned_at: now });
    await db('trip_orders').insert(ids.map((id, k) => ({ trip_id: tripId, order_id: id, totes: JSON.stringify([k + 1]) })));
    const lineNo = [0, 0];
    for (const [si, [node, binIdx]] of ordered.entries()) {
      const bin = plan.geometry.bins[binIdx]!;
      const [{ id: stopId }] = await db('stops').insert(
        { trip_id: tripId, n: si + 1, node, x_m: plan.graph.x[node]!, y_m: plan.graph.y[node]!, bins: JSON.stringify([bin.code]), status: 'open' },
        'id',
      );
      const sku = `SKU-${String(binIdx + 1).padStart(5, '0')}`;
      const description = ITEMS[binIdx % ITEMS.length]!;
      const orderSlots = spec.twoLineEvery && (si + 1) % spec.twoLineEvery === 0 ? [0, 1] : [si % 2];
      for (const o of orderSlots) {
        lineNo[o]! += 1;
        const qty = 1 + ((binIdx + o) % 4);
        const [{ id: olId }] = await db('order_lines').insert({ order_id: ids[o], line_no: lineNo[o], sku, qty }, 'id');
        await db('pick_lines').insert({
          trip_id: tripId,
          stop_id: stopId,
          order_id: ids[o],
          order_line_id: olId,
          order_ref: refs[o],
          sku,
          description,
          bin: bin.code,
          qty,
          tote: o + 1,
          status: 'open',
        });
      }
    }
    for (const [o, id] of ids.entries()) await db('orders').where({ id }).update({ lines: lineNo[o] });
    totalMetres += tour.length;
    totalLines += lines;
    totalSeconds += estSeconds;
  }
  await db('waves')
    .where({ id: waveId })
    .update({
      orders_count: orderIds.length,
      lines_count: totalLines,
      planned_metres: totalMetres,
      lower_bound_metres: totalMetres * 0.95,
      single_metres: totalMetres * 1.5,
      est_seconds: totalSeconds,
    });
  return { waveId: waveId!, planId: opts.planId, tripIds, orderIds };
}

/** Shortest walking distance between two nodes of a plan (metres), for checks in tests. */
export async function planDistance(db: Knex, planId: number): Promise<(a: number, b: number) => number> {
  const plan = await loadPlanIndex(db, planId);
  return (a, b) => pairDistance(plan.index, a, b);
}
