import { describe, expect, it } from 'vitest';
import { diagnosePlan } from '../../../server/core/plan/diagnostics';
import { aisleLetters, generateRectangularPlan } from '../../../server/core/plan/generate';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';

const base = { aisles: 4, aisleLengthM: 30, aisleSpacingM: 3, baysPerAisle: 10, levels: 3 };

describe('aisleLetters', () => {
  it('counts like spreadsheet columns', () => {
    expect([0, 1, 25, 26, 27, 51, 52, 701, 702].map(aisleLetters)).toEqual(['A', 'B', 'Z', 'AA', 'AB', 'AZ', 'BA', 'ZZ', 'AAA']);
  });
});

describe('generateRectangularPlan', () => {
  it('makes aisles × bays × levels × sides bins with unique codes of the documented form', () => {
    const plan = generateRectangularPlan(base);
    expect(plan.aisles.map((a) => [a.code, a.x, a.yStart, a.yEnd])).toEqual([
      ['A', 0, 0, 30],
      ['B', 3, 0, 30],
      ['C', 6, 0, 30],
      ['D', 9, 0, 30],
    ]);
    expect(plan.bins.length).toBe(4 * 10 * 3 * 2);
    expect(new Set(plan.bins.map((b) => b.code)).size).toBe(plan.bins.length);
    for (const b of plan.bins) {
      expect(b.code).toMatch(/^[A-Z]+-\d{2}-\d{2}-[12]$/);
      const [aisle, bay, level, side] = b.code.split('-');
      expect([aisle, Number(bay), Number(level), side]).toEqual([b.aisle, b.bay, b.level, b.side === 'L' ? '1' : '2']);
    }
    expect(plan.bins.find((b) => b.code === 'C-07-03-2')).toEqual(expect.objectContaining({ aisle: 'C', bay: 7, level: 3, side: 'R' }));
  });

  it('puts left-side bins only when asked for one side, and widens bay numbers past 99', () => {
    const plan = generateRectangularPlan({ ...base, bothSides: false, baysPerAisle: 120, levels: 1, aisleLengthM: 150 });
    expect(plan.bins.every((b) => b.side === 'L')).toBe(true);
    expect(plan.bins.length).toBe(4 * 120);
    expect(plan.bins[0]!.code).toBe('A-001-01-1');
  });

  it('spaces bays evenly inside each block, clear of the cross aisles', () => {
    const plan = generateRectangularPlan({ ...base, levels: 1, bothSides: false, crossAisles: { front: true, back: true, middle: 1 }, crossAisleWidthM: 2 });
    expect(plan.crossAisles.map((c) => [c.code, c.y, c.xStart, c.xEnd])).toEqual([
      ['front', 0, 0, 9],
      ['middle-1', 15, 0, 9],
      ['back', 30, 0, 9],
    ]);
    // Two blocks of 5 bays; racks from 1 to 14 and from 16 to 29, so bays 2.6 m long, centres 1.3 m in.
    const ys = plan.bins.filter((b) => b.aisle === 'A').map((b) => b.y);
    const expected = [2.3, 4.9, 7.5, 10.1, 12.7, 17.3, 19.9, 22.5, 25.1, 27.7];
    ys.forEach((y, i) => expect(y).toBeCloseTo(expected[i]!, 12));
  });

  it('places the depot front left, front centre or at a given x, 2 m in front by default', () => {
    expect(generateRectangularPlan(base).depots).toEqual([{ code: 'D1', x: 0, y: -2 }]);
    expect(generateRectangularPlan({ ...base, depot: { at: 'front_centre' } }).depots[0]).toEqual({ code: 'D1', x: 4.5, y: -2 });
    expect(generateRectangularPlan({ ...base, depot: { at: 'custom', x: 7 }, depotSetbackM: 1 }).depots[0]).toEqual({ code: 'D1', x: 7, y: -1 });
  });

  it('gives a plan the walk graph accepts without a single problem', () => {
    for (const crossAisles of [{}, { back: false }, { front: false, middle: 1 }, { front: true, back: true, middle: 3 }]) {
      const plan = generateRectangularPlan({ ...base, crossAisles, depot: { at: 'front_centre' } });
      expect(diagnosePlan(plan, buildWalkGraph(plan))).toEqual([]);
    }
  });

  it('is deterministic', () => {
    const params = { ...base, crossAisles: { middle: 2 }, depot: { at: 'front_centre' as const } };
    expect(generateRectangularPlan(params)).toEqual(generateRectangularPlan(params));
  });

  it('refuses impossible parameters', () => {
    expect(() => generateRectangularPlan({ ...base, aisles: 0 })).toThrow(RangeError);
    expect(() => generateRectangularPlan({ ...base, levels: 1.5 })).toThrow(/levels/);
    expect(() => generateRectangularPlan({ ...base, aisleLengthM: -3 })).toThrow(/aisleLengthM/);
    expect(() => generateRectangularPlan({ ...base, crossAisles: { front: false, back: false } })).toThrow(/cross aisle/);
    expect(() => generateRectangularPlan({ ...base, aisleLengthM: 5, crossAisles: { middle: 3 } })).toThrow(/no room/);
    expect(() => generateRectangularPlan({ ...base, depot: { at: 'custom', x: Number.NaN } })).toThrow(/custom depot/);
  });
});
