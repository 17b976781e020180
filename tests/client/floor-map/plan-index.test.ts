// @vitest-environment node
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { binCentre, binRect, buildPlanIndex, hitTestBin, querySlots, type PlanIndex } from '../../../client/components/floor-map/plan-index';
import type { PlanGeometry } from '../../../client/components/floor-map/types';
import { generateRectangularPlan } from '../../../server/core/plan/generate';

// 40 aisles × 50 bays × 2 sides × 5 levels = 20,000 bins, the size the map must stay smooth at.
const big = generateRectangularPlan({ aisles: 40, aisleLengthM: 72, aisleSpacingM: 5, baysPerAisle: 50, levels: 5, crossAisles: { middle: 1 } });
const opts = { aisleHalfWidth: 1.5, rackDepth: 1.0, crossAisleHalfWidth: 1.5 };
const index = buildPlanIndex(big, opts);

/** Brute-force oracle: every slot whose footprint meets the rect, scanned one by one. */
function slotsByScan(idx: PlanIndex, r: { minX: number; minY: number; maxX: number; maxY: number }): number[] {
  const out: number[] = [];
  for (let s = 0; s < idx.slotCount; s++) {
    const x0 = idx.slotRect[s * 4] as number;
    const y0 = idx.slotRect[s * 4 + 1] as number;
    const x1 = idx.slotRect[s * 4 + 2] as number;
    const y1 = idx.slotRect[s * 4 + 3] as number;
    if (x1 >= r.minX && x0 <= r.maxX && y1 >= r.minY && y0 <= r.maxY) out.push(s);
  }
  return out;
}

describe('buildPlanIndex', () => {
  it('indexes every bin once and groups the levels of a bay side into one slot', () => {
    expect(index.bins).toHaveLength(20_000);
    expect(index.byCode.size).toBe(20_000);
    expect(index.slotCount).toBe(4_000);
    expect(big.bins.filter((bin) => index.bins[index.byCode.get(bin.code) as number] !== bin)).toEqual([]);
    expect(index.unplaced).toEqual([]);
  });

  it('draws each bin beside its aisle on its own side, between rack face and rack back', () => {
    const aisleX = new Map(big.aisles.map((a) => [a.code, a.x]));
    const wrong: string[] = [];
    const eps = 1e-9;
    for (let i = 0; i < index.bins.length; i++) {
      const bin = index.bins[i]!;
      const x = aisleX.get(bin.aisle)!;
      const r = binRect(index, i);
      const beside = bin.side === 'L' ? r.maxX <= x - 1.5 + eps && r.minX >= x - 2.5 - eps : r.minX >= x + 1.5 - eps && r.maxX <= x + 2.5 + eps;
      if (!beside || !(r.minY < bin.y && r.maxY > bin.y)) wrong.push(bin.code);
    }
    expect(wrong).toEqual([]);
  });

  it('puts level 1 nearest the aisle and higher levels further back', () => {
    const l1 = binRect(index, index.byCode.get('C-07-01-2')!);
    const l5 = binRect(index, index.byCode.get('C-07-05-2')!);
    expect(l1.minX).toBeLessThan(l5.minX);
    const left1 = binRect(index, index.byCode.get('C-07-01-1')!);
    const left5 = binRect(index, index.byCode.get('C-07-05-1')!);
    expect(left1.maxX).toBeGreaterThan(left5.maxX);
  });

  it('keeps neighbouring bays apart (footprints do not overlap along the aisle)', () => {
    const a = binRect(index, index.byCode.get('D-10-01-1')!);
    const b = binRect(index, index.byCode.get('D-11-01-1')!);
    expect(a.maxY).toBeLessThan(b.minY);
  });

  it('merges the racks of each aisle side into runs split at the middle cross aisle', () => {
    // Two blocks per aisle side: 40 aisles × 2 sides × 2 blocks.
    expect(index.runCount).toBe(160);
  });

  it('lists bins whose aisle is not on the plan instead of drawing them somewhere', () => {
    const plan: PlanGeometry = {
      aisles: [{ code: 'A', x: 0, yStart: 0, yEnd: 10 }],
      crossAisles: [],
      depots: [],
      bins: [
        { code: 'A-1', aisle: 'A', y: 2, bay: 1, side: 'L', level: 1, zone: null },
        { code: 'Z-1', aisle: 'Z', y: 2, bay: 1, side: 'L', level: 1, zone: null },
      ],
    };
    const idx = buildPlanIndex(plan, opts);
    expect(idx.unplaced).toEqual(['Z-1']);
    expect(idx.bins.map((b) => b.code)).toEqual(['A-1']);
  });

  it('copes with an empty plan', () => {
    const idx = buildPlanIndex({ aisles: [], crossAisles: [], bins: [], depots: [] }, opts);
    expect(idx.bounds).toBeNull();
    expect(querySlots(idx, { minX: -1, minY: -1, maxX: 1, maxY: 1 }, new Uint32Array(4)).count).toBe(0);
    expect(hitTestBin(idx, 0, 0)).toBe(-1);
  });
});

describe('querySlots (culling)', () => {
  it('finds exactly the slots a full scan finds, for any rectangle', () => {
    const b = index.bounds!;
    const x = fc.double({ min: b.minX - 20, max: b.maxX + 20, noNaN: true });
    const y = fc.double({ min: b.minY - 20, max: b.maxY + 20, noNaN: true });
    fc.assert(
      fc.property(x, y, fc.double({ min: 0, max: 80, noNaN: true }), fc.double({ min: 0, max: 50, noNaN: true }), (x0, y0, w, h) => {
        const rect = { minX: x0, minY: y0, maxX: x0 + w, maxY: y0 + h };
        const got = querySlots(index, rect, new Uint32Array(8));
        const found = Array.from(got.out.subarray(0, got.count)).sort((p, q) => p - q);
        expect(found).toEqual(slotsByScan(index, rect));
      }),
      { numRuns: 200 },
    );
  });
});

describe('hitTestBin', () => {
  it('returns each bin when the point is in the middle of its level band', () => {
    const missed: number[] = [];
    for (let i = 0; i < index.bins.length; i++) {
      const c = binCentre(index, i);
      if (hitTestBin(index, c.x, c.y) !== i) missed.push(i);
    }
    expect(missed).toEqual([]);
  });

  it('finds nothing on an aisle centre line or in a cross aisle', () => {
    expect(hitTestBin(index, big.aisles[3]!.x, 20)).toBe(-1);
    expect(hitTestBin(index, 52, 36)).toBe(-1);
  });

  it('forgives a fingertip just outside the rack only within the slop', () => {
    const i = index.byCode.get('F-03-01-2')!;
    const r = binRect(index, i);
    const y = (r.minY + r.maxY) / 2;
    // 0.3 m into the aisle from the rack face of a right-side bin.
    expect(hitTestBin(index, r.minX - 0.3, y)).toBe(-1);
    expect(hitTestBin(index, r.minX - 0.3, y, 0.4)).toBe(i);
  });
});
