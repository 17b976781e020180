import { describe, expect, it } from 'vitest';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { buildDistanceIndex } from '../../../server/core/plan/distances';
import type { PlanClosure } from '../../../server/core/plan/types';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import { planWaveOnPlan, type PlannerInput, type PlannerOrder } from '../../../server/waves/wave-planner';

const geometry = generateRectangularPlan({ aisles: 4, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 8, levels: 1 });
const bins = geometry.bins.map((b) => b.code);
const orders: PlannerOrder[] = Array.from({ length: 6 }, (_, i) => ({
  ref: `O-${i + 1}`,
  due: null,
  priority: null,
  lines: [0, 1].map((k) => ({ sku: `S-${i}-${k}`, qty: 1, bin: bins[(i * 7 + k * 13) % bins.length]!, unitKg: 1, unitLitres: 1 })),
}));

function input(closures: PlanClosure[], withClosures: boolean): PlannerInput {
  const graph = buildWalkGraph(geometry, closures);
  return {
    geometry,
    graph,
    index: buildDistanceIndex(graph),
    orders,
    cart: { totes: 4, maxKg: 100, maxLitres: 100 },
    batching: 'fcfs',
    method: 'best',
    improve: 'local',
    depotIdx: 0,
    speeds: { walkingSpeedMps: 1, secondsPerLine: 10, secondsPerStop: 0 },
    ...(withClosures ? { closures } : {}),
  };
}

describe('planWaveOnPlan and open closures', () => {
  it('gives an S-shape figure on an open block layout', () => {
    const out = planWaveOnPlan(input([], true));
    expect(out.unslotted).toEqual([]);
    expect(out.result.totals.sShapeMetres).not.toBeNull();
    // S-shape is a feasible walk through the same stops, so the planned circuits are never longer (restart from its order).
    expect(out.result.totals.metres).toBeLessThanOrEqual(out.result.totals.sShapeMetres! + 1e-6);
  });

  it('gives no S-shape figure while a stretch is closed, and says why (regression: the policy walked through the closed stretch)', () => {
    // A short closure near the back of aisle B: every bin stays reachable, but S-shape would walk through it.
    const aisle = geometry.aisles[1]!;
    const closures: PlanClosure[] = [{ kind: 'aisle', code: aisle.code, from: aisle.yEnd - 1.5, to: aisle.yEnd - 0.5 }];
    const out = planWaveOnPlan(input(closures, true));
    expect(out.result.totals.sShapeMetres).toBeNull();
    expect(out.result.totals.sShapeNote).toMatch(/^no S-shape figure: .*closed aisle stretches/);
    expect(out.result.trips.length).toBeGreaterThan(0);
  });
});
