import { describe, expect, it } from 'vitest';
import type { FloorPlanCheckProgress } from '../../../shared/floor-plans';
import { FloorPlanCheck } from '../../../shared/floor-plans';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import { checkFloorPlanRead } from '../../../server/floor-plans/import/check';
import { buildFloorPlanTemplate, checkFloorPlanFile, floorPlanToWorkbook } from '../../../server/floor-plans/import/index';
import { FLOOR_PLAN_SPEC } from '../../../server/floor-plans/import/spec';
import { DEFAULT_IMPORT_LIMITS } from '../../../server/imports/limits';
import { readSpreadsheet } from '../../../server/imports/spreadsheet';
import { sitePlan } from '../../helpers/plans';

describe('checkFloorPlanFile', () => {
  it('passes the template with ok = true, and its answer matches the shared schema', async () => {
    const r = await checkFloorPlanFile(buildFloorPlanTemplate(), 'template.xlsx');
    expect(r.ok).toBe(true);
    expect(r.errors).toEqual([]);
    expect(FloorPlanCheck.parse(r)).toEqual(r);
    // The bins come back from the worker packed into arrays; unpacked they equal an in-process check.
    const inProcess = checkFloorPlanRead(readSpreadsheet(buildFloorPlanTemplate(), 't.xlsx', FLOOR_PLAN_SPEC, DEFAULT_IMPORT_LIMITS), { maxIssues: 10 });
    expect(r).toEqual(inProcess);
    expect(new Set(r.plan!.bins.map((b) => b.zone))).toEqual(new Set(['fast', 'bulk']));
  });

  it('round-trips a generated plan written to xlsx to the same geometry and walk graph', async () => {
    const plan = sitePlan({ aisles: 8, aisleLengthM: 30, baysPerAisle: 10, levels: 3 }, 1);
    const r = await checkFloorPlanFile(floorPlanToWorkbook(plan), 'generated.xlsx');
    expect(r.errors).toEqual([]);
    // The workbook gives bins by y_m, so the bay number does not travel; positions do, bit for bit.
    expect(r.plan).toEqual({ ...plan, bins: plan.bins.map((b) => ({ ...b, bay: null })) });
    const a = buildWalkGraph(plan);
    const b = buildWalkGraph(r.plan!);
    for (const key of ['x', 'y', 'offsets', 'targets', 'lengths', 'binNode', 'depotNode'] as const) expect(b[key]).toEqual(a[key]);
    // Generator: 8 aisles × 10 bays share one access point per bay; 8 aisles × 30 m.
    expect(r.stats).toEqual({ aisles: 8, crossAisles: 3, bins: 8 * 10 * 2 * 3, accessPoints: 80, depots: 1, totalAisleLengthM: 240 });
  });

  it('reports parsing then checking progress from the worker while the event loop keeps turning', async () => {
    // 40 aisles × 50 bays × 2 sides × 5 levels = 20,000 bins.
    const plan = generateRectangularPlan({ aisles: 40, aisleLengthM: 60, aisleSpacingM: 3, baysPerAisle: 50, levels: 5 });
    const bytes = floorPlanToWorkbook(plan);
    let ticks = 0;
    const timer = setInterval(() => ticks++, 1);
    const events: (FloorPlanCheckProgress & { ticks: number })[] = [];
    const r = await checkFloorPlanFile(bytes, 'big.xlsx', { onProgress: (p) => events.push({ ...p, ticks }) });
    clearInterval(timer);
    expect(r.ok).toBe(true);
    expect(r.stats.bins).toBe(20_000);
    const phases = events.map((e) => e.phase);
    expect(phases[0]).toBe('parsing');
    expect(phases.lastIndexOf('parsing')).toBeLessThan(phases.indexOf('checking'));
    expect(events.at(-1)).toMatchObject({ phase: 'checking', fraction: 1 });
    for (const phase of ['parsing', 'checking'] as const) {
      const f = events.filter((e) => e.phase === phase).map((e) => e.fraction);
      expect(f).toEqual([...f].sort((x, y) => x - y));
    }
    // Parsing ran in the worker: timers on this thread fired between its first and last report.
    const parsing = events.filter((e) => e.phase === 'parsing');
    expect(parsing.at(-1)!.ticks).toBeGreaterThan(parsing[0]!.ticks);
  });
});
