import { describe, expect, it } from 'vitest';
import { diagnosePlan } from '../../../server/core/plan/diagnostics';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import { crowdedAislePairs, MIN_WALKING_WIDTH_M, NOMINAL_RACK_DEPTH_M, type PlanGeometry } from '../../../shared/plan-geometry';

// Hand-worked: two aisles with bins on both sides, centre lines p apart. Between them stand the right
// racks of the left aisle and the left racks of the right one, 1 m each (nominal depth), so p − 2 m is
// left to walk; under 1 m (common practice for a picker on foot) the pair is listed.
const plan = (pitch: number, sides: ('L' | 'R')[] = ['L', 'R']): PlanGeometry => {
  const p = generateRectangularPlan({ aisles: 2, aisleLengthM: 20, aisleSpacingM: pitch, baysPerAisle: 4, levels: 1 });
  return { ...p, bins: p.bins.filter((b) => sides.includes(b.side)) };
};

describe('aisles closer than the racks drawn on them', () => {
  it('uses 1 m racks and 1 m to walk, as the messages say', () => {
    expect(NOMINAL_RACK_DEPTH_M).toBe(1);
    expect(MIN_WALKING_WIDTH_M).toBe(1);
  });

  it('lists a pair whose facing racks leave under 1 m, with the pitch and the room left', () => {
    expect(crowdedAislePairs(plan(2.5))).toEqual([{ left: 0, right: 1, pitchM: 2.5, clearM: 0.5 }]);
    // Racks wider than the gap: nothing is left to walk, never a negative width.
    expect(crowdedAislePairs(plan(1.5))[0]!.clearM).toBe(0);
  });

  it('leaves pairs with room to walk alone (exactly 1 m, and the demo layout’s 3.2 m)', () => {
    expect(crowdedAislePairs(plan(3))).toEqual([]);
    expect(crowdedAislePairs(plan(3.2))).toEqual([]);
  });

  it('counts only the racks that face each other: bins on the left side only leave one rack between', () => {
    // Left aisle's right side is empty; the right aisle's left racks stand between: 1.8 − 1 = 0.8 m.
    expect(crowdedAislePairs(plan(1.8, ['L']))).toEqual([{ left: 0, right: 1, pitchM: 1.8, clearM: expect.closeTo(0.8, 9) }]);
    expect(crowdedAislePairs(plan(1.8, ['L']))[0]!.clearM).toBeLessThan(1);
  });

  it('ignores aisles side by side in x whose stretches do not overlap along y', () => {
    const p = plan(2);
    const apart: PlanGeometry = { ...p, aisles: [p.aisles[0]!, { ...p.aisles[1]!, yStart: 30, yEnd: 50 }], bins: p.bins.filter((b) => b.aisle === 'A') };
    expect(crowdedAislePairs(apart)).toEqual([]);
  });

  it('is a warning of the plan check naming both aisles, not an error', () => {
    const p = plan(2.5);
    const problems = diagnosePlan(p, buildWalkGraph(p));
    expect(problems).toEqual([
      {
        severity: 'warning',
        code: 'aisles_too_close',
        entity: 'aisle',
        index: 1,
        message: 'aisles A and B are 2.5 m apart: with racks about 1 m deep between them that leaves 0.5 m to walk, under 1 m',
      },
    ]);
  });
});
