import { describe, expect, it } from 'vitest';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { createRng } from '../../../server/core/rng';
import { abcExponent, drawRank, generateStudyOrders } from '../../../server/studies/generate-orders';

const plan = generateRectangularPlan({ aisles: 6, aisleLengthM: 24, aisleSpacingM: 3.2, baysPerAisle: 12, levels: 2 });
const spec = { waves: 3, ordersPerWave: 50, linesMin: 2, linesMax: 4, skus: 200, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 3 };

describe('generated study orders', () => {
  it('solves the ABC curve F(x) = xˢ for "20 % of SKUs draw 80 % of lines"', () => {
    // s = ln 0.8 / ln 0.2 (Hausman, Schwarz & Graves 1976 curve, from memory), about 0.1386.
    expect(abcExponent(20, 80)).toBeCloseTo(Math.log(0.8) / Math.log(0.2), 12);
    expect(abcExponent(20, 80)).toBeCloseTo(0.1386, 4);
    expect(abcExponent(50, 50)).toBeCloseTo(1, 12);
  });

  it('draws lines so the most popular 20 % of SKUs get about 80 % of them (the Pareto rule of thumb, common practice)', () => {
    const rng = createRng(9);
    const skus = 1000;
    const s = abcExponent(20, 80);
    let top = 0;
    const draws = 200_000;
    for (let i = 0; i < draws; i++) if (drawRank(rng, skus, s) < skus * 0.2) top++;
    expect(top / draws).toBeGreaterThan(0.79);
    expect(top / draws).toBeLessThan(0.81);
  });

  it('makes the same orders for the same seed and others for another seed', () => {
    expect(generateStudyOrders(plan.bins, spec, 3)).toEqual(generateStudyOrders(plan.bins, spec, 3));
    expect(generateStudyOrders(plan.bins, spec, 4)).not.toEqual(generateStudyOrders(plan.bins, spec, 3));
  });

  it('keeps lines per order in range, SKUs distinct within an order and each SKU in its own bin', () => {
    const waves = generateStudyOrders(plan.bins, spec, 3);
    expect(waves).toHaveLength(3);
    const binOf = new Map<string, string>();
    for (const orders of waves) {
      expect(orders).toHaveLength(50);
      for (const o of orders) {
        expect(o.lines.length).toBeGreaterThanOrEqual(2);
        expect(o.lines.length).toBeLessThanOrEqual(4);
        expect(new Set(o.lines.map((l) => l.sku)).size).toBe(o.lines.length);
        for (const l of o.lines) {
          expect(l.qty).toBeGreaterThanOrEqual(1);
          expect(l.qty).toBeLessThanOrEqual(3);
          expect(binOf.get(l.sku) ?? l.bin).toBe(l.bin);
          binOf.set(l.sku, l.bin);
        }
      }
    }
    const bins = [...binOf.values()];
    expect(new Set(bins).size).toBe(bins.length);
  });
});
