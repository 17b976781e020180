import { describe, expect, it } from 'vitest';
import { runStudy } from '../../../server/studies/study-engine';
import { smallPlan, smallStudy, wavesOn } from './helpers';

describe('study progress', () => {
  it('moves forward wave by wave and method by method, ending at 1', () => {
    const geometry = smallPlan();
    const waves = wavesOn(geometry, { waves: 3, ordersPerWave: 10, linesMin: 1, linesMax: 3, skus: 60, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 2 }, 3);
    const seen: { f: number; phase: string }[] = [];
    runStudy(smallStudy(geometry, waves, 1, { progress: (f, phase) => seen.push({ f, phase }) }));
    for (let i = 1; i < seen.length; i++) expect(seen[i]!.f).toBeGreaterThanOrEqual(seen[i - 1]!.f);
    expect(seen.at(-1)).toEqual({ f: 1, phase: 'done' });
    // Each batching method reports each wave, and routing reports each trip with its wave.
    for (const m of ['One order per trip', 'Clarke–Wright savings']) {
      for (let w = 1; w <= 3; w++) expect(seen.some((s) => s.phase.includes(m) && s.phase.includes(`wave ${w} of 3`))).toBe(true);
    }
    expect(seen.filter((s) => /wave \d of 3, trip \d+ of \d+ routed/.test(s.phase)).length).toBeGreaterThan(3);
    // Many small steps, not a jump at the end: no single step moves the bar by more than a quarter.
    for (let i = 1; i < seen.length; i++) expect(seen[i]!.f - seen[i - 1]!.f).toBeLessThan(0.25);
  });
});
