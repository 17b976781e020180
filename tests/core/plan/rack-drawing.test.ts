/**
 * Issue 16, floor map: racks drawn 1.5 m + 1.0 m from each centre line on the demo's 3.2 m pitch made
 * neighbouring aisles' racks overlap. The map now draws racks at a depth and walkway that fit the
 * plan's pitch; the "aisles too close" check still measures with the nominal 1 m racks.
 */
import { describe, expect, it } from 'vitest';
import { buildPlanIndex } from '../../../client/components/floor-map/plan-index';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { DEMO_PLAN_PARAMS } from '../../../server/floor-plans/demo-seed';
import { engineParams } from '../../../server/floor-plans/floor-plans.service';
import { crowdedAislePairs, DRAWN_HALF_WIDTH_MAX_M, NOMINAL_RACK_DEPTH_M, rackDrawing, type PlanGeometry } from '../../../shared/plan-geometry';

/** Pairs of slot footprints that share area (touching edges, as back-to-back racks do, is not overlap). */
function overlappingSlots(plan: PlanGeometry): number {
  const index = buildPlanIndex(plan, { ...rackDrawing(plan), crossAisleHalfWidth: 1.5 });
  const r = index.slotRect;
  const eps = 1e-9;
  let n = 0;
  for (let a = 0; a < index.slotCount; a++)
    for (let b = a + 1; b < index.slotCount; b++) {
      const ox = Math.min(r[a * 4 + 2]!, r[b * 4 + 2]!) - Math.max(r[a * 4]!, r[b * 4]!);
      const oy = Math.min(r[a * 4 + 3]!, r[b * 4 + 3]!) - Math.max(r[a * 4 + 1]!, r[b * 4 + 1]!);
      if (ox > eps && oy > eps) n++;
    }
  return n;
}

const twoAisles = (pitch: number): PlanGeometry => generateRectangularPlan({ aisles: 2, aisleLengthM: 12, aisleSpacingM: pitch, baysPerAisle: 4, levels: 1 });

describe('racks drawn to fit the aisle pitch', () => {
  it('on the demo plan (3.2 m pitch, racks both sides): 1 m racks and a 1.2 m walkway, nothing overlapping', () => {
    const demo = generateRectangularPlan(engineParams(DEMO_PLAN_PARAMS));
    // Hand-worked: 3.2 m between centre lines = two 1 m racks + two walkway halves of 0.6 m.
    expect(rackDrawing(demo)).toEqual({ aisleHalfWidth: expect.closeTo(0.6, 9), rackDepth: NOMINAL_RACK_DEPTH_M });
    expect(overlappingSlots(demo)).toBe(0);
  });

  it('the former fixed drawing (1.5 m + 1 m each side) did overlap on that plan, so the check above can fail', () => {
    const demo = generateRectangularPlan(engineParams(DEMO_PLAN_PARAMS));
    const index = buildPlanIndex(demo, { aisleHalfWidth: 1.5, rackDepth: 1, crossAisleHalfWidth: 1.5 });
    // The right edge of aisle A's right-hand racks against the left edge of aisle B's left-hand racks.
    let maxRightOfA = -Infinity;
    let minLeftOfB = Infinity;
    for (let s = 0; s < index.slotCount; s++) {
      const bin = index.bins[index.slotFirstBin[s]!]!;
      if (bin.aisle === demo.aisles[0]!.code && bin.side === 'R') maxRightOfA = Math.max(maxRightOfA, index.slotRect[s * 4 + 2]!);
      if (bin.aisle === demo.aisles[1]!.code && bin.side === 'L') minLeftOfB = Math.min(minLeftOfB, index.slotRect[s * 4]!);
    }
    // 1.5 + 1 = 2.5 m each side of a centre line, 3.2 m apart: 1.8 m of overlap.
    expect(maxRightOfA - minLeftOfB).toBeCloseTo(1.8, 9);
  });

  it('keeps the nominal drawing when nothing limits it (one aisle, or aisles far apart)', () => {
    const one = generateRectangularPlan({ aisles: 1, aisleLengthM: 12, aisleSpacingM: 3, baysPerAisle: 4, levels: 1 });
    expect(rackDrawing(one)).toEqual({ aisleHalfWidth: DRAWN_HALF_WIDTH_MAX_M, rackDepth: NOMINAL_RACK_DEPTH_M });
    expect(rackDrawing(twoAisles(8))).toEqual({ aisleHalfWidth: DRAWN_HALF_WIDTH_MAX_M, rackDepth: NOMINAL_RACK_DEPTH_M });
  });

  it('draws shallower racks on a really crowded plan, without overlap, and the plan is still warned about', () => {
    const tight = twoAisles(1.5);
    // 1.5 m pitch: a 0.3 m walkway half (the narrowest drawn), leaving (1.5 − 0.6) / 2 = 0.45 m per rack.
    expect(rackDrawing(tight)).toEqual({ aisleHalfWidth: 0.3, rackDepth: expect.closeTo(0.45, 9) });
    expect(overlappingSlots(tight)).toBe(0);
    expect(crowdedAislePairs(tight)).toHaveLength(1);
  });

  it('counts only the rack sides that stand between two aisles', () => {
    const p = twoAisles(2.5);
    const leftOnly: PlanGeometry = { ...p, bins: p.bins.filter((b) => b.side === 'L') };
    // One 1 m rack between the centre lines: (2.5 − 1) / 2 = 0.75 m walkway half.
    expect(rackDrawing(leftOnly).aisleHalfWidth).toBeCloseTo(0.75, 9);
    expect(overlappingSlots(leftOnly)).toBe(0);
  });
});
