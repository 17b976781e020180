/**
 * Slotting engine: the popularity rule checked against the rearrangement inequality by brute force,
 * the guarantees (pins, budget, weight rule, one SKU per bin), the learn/test split and determinism.
 */
import { describe, expect, it } from 'vitest';
import { createRng } from '../../../server/core/rng';
import { abcRank, generateSlottingScenario, slotBinsOf } from '../../../server/core/slotting/generate';
import { planSlotting, type HistoryOrder, type SlotSku, type SlottingOptions } from '../../../server/core/slotting/index';
import { floorOf } from '../batch/fixtures';

const floor = floorOf({ aisles: 6, aisleLengthM: 24, aisleSpacingM: 3, baysPerAisle: 8, levels: 2 });
const bins = slotBinsOf(floor.plan, floor.graph);
const cart = { totes: 6, maxKg: 200, maxLitres: 600 };
/** A clock that never moves: budgets never expire, so runs are bounded by pass counts alone and repeat exactly. */
const still = () => 0;

const base = (over: Partial<SlottingOptions> & Pick<SlottingOptions, 'skus' | 'history'>): SlottingOptions => ({
  bins,
  method: 'popularity',
  depotNode: floor.depotNode,
  distance: floor.distance,
  cart,
  clock: still,
  ...over,
});

function permutations(n: number): number[][] {
  if (n === 1) return [[0]];
  return permutations(n - 1).flatMap((p) => Array.from({ length: n }, (_, i) => [...p.slice(0, i), n - 1, ...p.slice(i)]));
}

describe('popularity slotting', () => {
  it('matches the brute-force optimum for one-line orders (rearrangement inequality, Hardy, Littlewood & Pólya 1934)', () => {
    // Six SKUs and the six bins of three access points at different distances from the depot; each
    // order is one line, so each trip walks out to one bin and back: 2 × distance × picks.
    const chosen = [bins[0]!, bins[1]!, bins[40]!, bins[41]!, bins[90]!, bins[95]!];
    const picks = [1, 9, 3, 7, 2, 5];
    const skus: SlotSku[] = picks.map((_, i) => ({ code: `S${i}`, bin: chosen[(i + 3) % 6]!.code, unitKg: 1, unitLitres: 1 }));
    const history: HistoryOrder[] = [];
    picks.forEach((p, i) => {
      for (let k = 0; k < p; k++) history.push({ ref: `O${i}-${k}`, day: 0, lines: [{ sku: `S${i}`, qty: 1 }] });
    });
    const oneTote = { totes: 1, maxKg: 100, maxLitres: 100 };
    const r = planSlotting(base({ bins: chosen, skus, history, cart: oneTote }));
    const depotM = chosen.map((b) => floor.distance(floor.depotNode, b.node));
    let best = Infinity;
    for (const perm of permutations(6)) {
      best = Math.min(
        best,
        picks.reduce((sum, p, i) => sum + 2 * p * depotM[perm[i]!]!, 0),
      );
    }
    expect(r.figures.whole.metresAfter).toBeCloseTo(best, 6);
    // And it is a real improvement over the slotting it started from.
    expect(r.figures.whole.metresBefore).toBeGreaterThan(best + 1);
  });
});

describe('slotting guarantees', () => {
  const rng = createRng(7);
  const scenario = generateSlottingScenario({ bins, skuCount: 120, days: 6, ordersPerDay: 25, maxLines: 4, rng });
  const pinnedBins = new Set(bins.filter((b) => b.code.startsWith('A-')).map((b) => b.code));
  const pinned = bins.map((b) => (pinnedBins.has(b.code) ? { ...b, pinned: true } : b));

  for (const method of ['popularity', 'cube-per-order', 'search'] as const) {
    it(`${method}: pinned bins keep their SKUs, the budget and the weight rule hold, one SKU per bin`, () => {
      const r = planSlotting(
        base({ bins: pinned, skus: scenario.skus, history: scenario.history, method, maxMoves: 30, weightRule: { minUnitKg: 15, maxLevel: 1 } }),
      );
      expect(r.moves.length).toBeGreaterThan(0);
      expect(r.moves.length).toBeLessThanOrEqual(30);
      const before = new Map(scenario.skus.map((s) => [s.code, s.bin]));
      const level = new Map(bins.map((b) => [b.code, b.level]));
      const unit = new Map(scenario.skus.map((s) => [s.code, s.unitKg]));
      let changed = 0;
      for (const [sku, bin] of r.assignment) {
        if (before.get(sku) !== bin) changed++;
        if (pinnedBins.has(before.get(sku) ?? '')) expect(bin).toBe(before.get(sku));
      }
      expect(changed).toBe(r.moves.length);
      for (const m of r.moves) {
        expect(pinnedBins.has(m.toBin)).toBe(false);
        expect(r.assignment.get(m.sku)).toBe(m.toBin);
        if (unit.get(m.sku)! >= 15) expect(level.get(m.toBin)).toBeLessThanOrEqual(1);
      }
      expect(new Set(r.assignment.values()).size).toBe(r.assignment.size);
    });
  }

  it('learns on the earlier days and tests on the later ones', () => {
    const r = planSlotting(base({ skus: scenario.skus, history: scenario.history, learnFraction: 0.5 }));
    expect(r.figures.learn.days).toBe(3);
    expect(r.figures.test.days).toBe(3);
    expect(r.figures.learn.orders + r.figures.test.orders).toBe(scenario.history.length);
    expect(r.figures.whole.metresBefore).toBeCloseTo(r.figures.learn.metresBefore + r.figures.test.metresBefore, 6);
    // A random slotting of a 20/80 history leaves a lot to gain, on the days it learnt from and the ones it did not.
    expect(r.figures.learn.savingPct).toBeGreaterThan(5);
    expect(r.figures.test.savingPct).toBeGreaterThan(0);
    expect(r.figures.test.pickerHoursPerDay).toBeGreaterThan(0);
  });

  it('search is never longer than the better construction on the learning days, and repeats exactly', () => {
    const opts = base({ skus: scenario.skus, history: scenario.history });
    const pop = planSlotting({ ...opts, method: 'popularity' });
    const coi = planSlotting({ ...opts, method: 'cube-per-order' });
    const a = planSlotting({ ...opts, method: 'search' });
    const b = planSlotting({ ...opts, method: 'search' });
    expect(a.figures.learn.metresAfter).toBeLessThanOrEqual(Math.min(pop.figures.learn.metresAfter, coi.figures.learn.metresAfter) + 1e-6);
    expect(b.moves).toEqual(a.moves);
  });

  it('lists moves with the most estimated saving first', () => {
    const r = planSlotting(base({ skus: scenario.skus, history: scenario.history, maxMoves: 10 }));
    for (let i = 1; i < r.moves.length; i++) expect(r.moves[i - 1]!.estSavingMPerDay).toBeGreaterThanOrEqual(r.moves[i]!.estSavingMPerDay);
  });
});

describe('20/80 history generator', () => {
  it('draws about 80 % of picks from the most popular 20 % of SKUs (ABC curve with A = 1/15)', () => {
    const rng = createRng(3);
    const n = 500;
    let top = 0;
    const draws = 50_000;
    for (let i = 0; i < draws; i++) if (abcRank(rng.next(), n) < n * 0.2) top++;
    expect(top / draws).toBeGreaterThan(0.78);
    expect(top / draws).toBeLessThan(0.82);
  });
});
