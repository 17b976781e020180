import { describe, expect, it } from 'vitest';
import { heatScale } from '@client/views/slotting/labels';

describe('slotting heat scale', () => {
  it('scales both maps by the busiest bin of either, square root so light bins still show', () => {
    const h = heatScale({ A: 4, B: 16 }, { A: 1, C: 64 });
    expect(h.max).toBe(64);
    expect(h.after.C).toBe(1);
    expect(h.before.B).toBeCloseTo(0.5, 12);
    expect(h.before.A).toBeCloseTo(0.25, 12);
    expect(h.after.A).toBeCloseTo(0.125, 12);
  });
  it('never divides by zero on an empty history', () => {
    expect(heatScale({}, {})).toEqual({ before: {}, after: {}, max: 1 });
  });
});
