import { describe, expect, it } from 'vitest';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { PlanGeometry } from '../../../server/core/plan/types';
import type { BlockLayout } from '../../../server/core/policy/layout';
import { aisleLength, blockLayoutOf, depthOf, stopOfBin, toBlockLayout, yOfDepth } from '../../../server/core/policy/layout';
import { isNotApplicable } from '../../../server/core/policy/types';

const base = (): PlanGeometry => generateRectangularPlan({ aisles: 5, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 10, levels: 2 });

function layoutOf(plan: PlanGeometry, options = {}): BlockLayout {
  const r = toBlockLayout(plan, options);
  if (isNotApplicable(r)) throw new Error(r.reason);
  return r;
}

function reasonOf(plan: PlanGeometry, options = {}): string {
  const r = toBlockLayout(plan, options);
  return isNotApplicable(r) ? r.reason : '';
}

describe('toBlockLayout', () => {
  it('reads a rectangular single-block plan: aisle x ascending, front and back cross aisles, depot projected', () => {
    const layout = layoutOf(base());
    expect(Array.from(layout.aisleX)).toEqual([0, 3, 6, 9, 12]);
    expect(layout.aisleCodes).toEqual(['A', 'B', 'C', 'D', 'E']);
    expect(layout.aisleIndex.get('C')).toBe(2);
    expect(Array.from(layout.crossY)).toEqual([0, 20]);
    expect(Array.from(layout.crossDepth)).toEqual([0, 20]);
    expect(layout.blocks).toBe(1);
    // The generator puts the depot 2 m in front of the first aisle (y = −2).
    expect(layout.depots).toEqual([{ code: 'D1', x: 0, offset: 2 }]);
    expect(aisleLength(layout)).toBe(20);
  });

  it('counts blocks from middle cross aisles and keeps the depot x of a centred depot', () => {
    const plan = generateRectangularPlan({
      aisles: 5,
      aisleLengthM: 30,
      aisleSpacingM: 3,
      baysPerAisle: 12,
      levels: 1,
      crossAisles: { middle: 2 },
      depot: { at: 'front_centre' },
    });
    const layout = layoutOf(plan);
    expect(layout.blocks).toBe(3);
    expect(Array.from(layout.crossDepth)).toEqual([0, 10, 20, 30]);
    expect(layout.depots[0]!.x).toBe(6);
  });

  it('does not depend on the order of rows in the plan', () => {
    const plan = base();
    const shuffled = { ...plan, aisles: [...plan.aisles].reverse(), crossAisles: [...plan.crossAisles].reverse() };
    expect(Array.from(layoutOf(shuffled).aisleX)).toEqual([0, 3, 6, 9, 12]);
  });

  it('takes the end cross aisle next to the depot as the front when it is the high-y one', () => {
    const plan = base();
    const layout = layoutOf({ ...plan, depots: [{ code: 'P', x: 6, y: 21 }] });
    expect(layout.frontY).toBe(20);
    expect(layout.depthSign).toBe(-1);
    expect(depthOf(layout, 15)).toBe(5);
    expect(yOfDepth(layout, 5)).toBe(15);
    expect(layout.depots[0]).toEqual({ code: 'P', x: 6, offset: 1 });
  });

  it('builds the layout for the named depot and lists only depots on the same front', () => {
    const plan = base();
    const depots = [
      { code: 'FRONT', x: 3, y: -1 },
      { code: 'BACK', x: 9, y: 22 },
      { code: 'FRONT2', x: 10, y: -3 },
    ];
    const layout = layoutOf({ ...plan, depots }, { depot: 'BACK' });
    expect(layout.depthSign).toBe(-1);
    expect(layout.depots.map((d) => d.code)).toEqual(['BACK']);
    expect(layoutOf({ ...plan, depots }).depots.map((d) => d.code)).toEqual(['FRONT', 'FRONT2']);
    expect(reasonOf({ ...plan, depots }, { depot: 'NOPE' })).toMatch(/no depot NOPE/);
  });

  it('gives a reason for a plan with a single cross aisle', () => {
    const plan = generateRectangularPlan({ aisles: 3, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 4, levels: 1, crossAisles: { back: false } });
    expect(reasonOf(plan)).toMatch(/front and a back cross aisle/);
  });

  it('gives a reason when a cross aisle stops short of an aisle', () => {
    const plan = base();
    const crossAisles = plan.crossAisles.map((c) => (c.code === 'back' ? { ...c, xEnd: 9 } : c));
    expect(reasonOf({ ...plan, crossAisles })).toMatch(/does not span every aisle/);
  });

  it('gives a reason when an aisle does not reach the back cross aisle', () => {
    const plan = base();
    const aisles = plan.aisles.map((a) => (a.code === 'B' ? { ...a, yEnd: 15 } : a));
    expect(reasonOf({ ...plan, aisles })).toMatch(/aisle B runs/);
  });

  it('gives a reason for two aisles on one centre line, closures, and a depot away from the end cross aisles', () => {
    const plan = base();
    expect(reasonOf({ ...plan, aisles: [...plan.aisles, { code: 'Z', x: 6, yStart: 0, yEnd: 20 }] })).toMatch(/share the centre line/);
    expect(reasonOf(plan, { closures: [{ kind: 'aisle', code: 'B', from: 2, to: 4 }] })).toMatch(/closed/);
    expect(reasonOf({ ...plan, depots: [{ code: 'MID', x: -3, y: 10 }] })).toMatch(/more than 5 m/);
    expect(reasonOf({ ...plan, depots: [] })).toMatch(/no depot/);
  });

  it('maps a bin to its stop, and a bin of an unknown aisle to null', () => {
    const layout = layoutOf(base());
    expect(stopOfBin(layout, { aisle: 'D', y: 7.5 })).toEqual({ aisle: 3, y: 7.5 });
    expect(stopOfBin(layout, { aisle: 'Q', y: 7.5 })).toBeNull();
  });
});

describe('blockLayoutOf', () => {
  it('lays out aisles, evenly spaced cross aisles and the depot from numbers', () => {
    const layout = blockLayoutOf({ aisles: 4, aisleSpacing: 2.5, aisleLength: 24, blocks: 3, depotX: 4 });
    expect(Array.from(layout.aisleX)).toEqual([0, 2.5, 5, 7.5]);
    expect(Array.from(layout.crossDepth)).toEqual([0, 8, 16, 24]);
    expect(layout.blocks).toBe(3);
    expect(layout.depots).toEqual([{ code: 'D', x: 4, offset: 0 }]);
  });

  it('rejects non-positive sizes', () => {
    expect(() => blockLayoutOf({ aisles: 0, aisleSpacing: 3, aisleLength: 20 })).toThrow(RangeError);
    expect(() => blockLayoutOf({ aisles: 3, aisleSpacing: 0, aisleLength: 20 })).toThrow(RangeError);
    expect(() => blockLayoutOf({ aisles: 3, aisleSpacing: 3, aisleLength: 20, blocks: 0 })).toThrow(RangeError);
  });
});
