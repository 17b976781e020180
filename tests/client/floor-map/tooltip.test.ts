// @vitest-environment node
import { describe, expect, it } from 'vitest';
import { binCentre, buildPlanIndex } from '../../../client/components/floor-map/plan-index';
import { placeTooltip } from '../../../client/components/floor-map/tooltip';
import { findBin } from '../../../client/components/floor-map/useBinSearch';
import type { Viewport } from '../../../client/components/floor-map/viewport';
import { generateRectangularPlan } from '../../../server/core/plan/generate';

const plan = generateRectangularPlan({ aisles: 4, aisleLengthM: 20, aisleSpacingM: 5, baysPerAisle: 8, levels: 2 });
const index = buildPlanIndex(plan, { aisleHalfWidth: 1.5, rackDepth: 1.0, crossAisleHalfWidth: 1.5 });
const W = 400;
const H = 300;

/** A viewport (10 px a metre, y down) that puts bin `b`'s centre at screen point (sx, sy). */
function viewWithBinAt(b: number, sx: number, sy: number): Viewport {
  const c = binCentre(index, b);
  return { scale: 10, ox: sx - c.x * 10, oy: sy - c.y * 10, flipY: false };
}

describe('placeTooltip', () => {
  const b = findBin(index, 'B-04-01-2')!;

  it('puts the box 14 px right of and below a bin in the open, naming the levels at its place', () => {
    const t = placeTooltip(index, b, viewWithBinAt(b, 100, 80), W, H);
    expect(t).not.toBeNull();
    expect(t!.bin.code).toBe('B-04-01-2');
    expect(t!.levels).toBe(2);
    expect(t!.left).toBeCloseTo(114, 6);
    expect(t!.top).toBeCloseTo(94, 6);
  });

  it('flips to the other side of the bin near the right and bottom edges, staying inside the map', () => {
    const t = placeTooltip(index, b, viewWithBinAt(b, 390, 290), W, H)!;
    expect(t.left).toBeCloseTo(390 - 214, 6);
    expect(t.top).toBeCloseTo(290 - 104, 6);
    expect(t.left).toBeGreaterThanOrEqual(4);
    expect(t.left + 214).toBeLessThanOrEqual(W);
  });

  it('shows nothing for a bin off screen or for no bin', () => {
    expect(placeTooltip(index, b, viewWithBinAt(b, -5, 80), W, H)).toBeNull();
    expect(placeTooltip(index, b, viewWithBinAt(b, 100, H + 1), W, H)).toBeNull();
    expect(placeTooltip(index, -1, viewWithBinAt(b, 100, 80), W, H)).toBeNull();
  });
});

describe('findBin', () => {
  it('finds a code typed in lower case or with spaces around it, and nothing for an unknown code', () => {
    const exact = findBin(index, 'C-03-02-2');
    expect(exact).toBeDefined();
    expect(findBin(index, '  c-03-02-2 ')).toBe(exact);
    expect(findBin(index, 'NOPE-1')).toBeUndefined();
  });
});
