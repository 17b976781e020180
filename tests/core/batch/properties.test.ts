import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { planWave } from '../../../server/core/batch/plan-wave';
import { ordersArb as ordersArbOf } from './arbitraries';
import { floorOf } from './fixtures';
import { waveProblems } from './invariants';

const floor = floorOf({ aisles: 6, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 8, levels: 2 });
const ordersArb = ordersArbOf(floor, 24, true);
const cartArb = fc.record({
  totes: fc.integer({ min: 1, max: 10 }),
  maxKg: fc.double({ min: 5, max: 120, noNaN: true }),
  maxLitres: fc.double({ min: 10, max: 300, noNaN: true }),
});
const methodArb = fc.constantFrom('single' as const, 'fcfs' as const, 'seed' as const, 'savings' as const);

describe('planWave properties (random orders and carts)', () => {
  it('places every line in exactly one trip within every capacity, or names the order with a reason', () => {
    fc.assert(
      fc.property(ordersArb, cartArb, methodArb, (orders, cart, batching) => {
        const wave = planWave({ orders, cart, batching, depotNode: floor.depotNode, distance: floor.distance, routing: { improve: 'none' } });
        expect(waveProblems({ orders, cart, depotNode: floor.depotNode, distance: floor.distance }, wave)).toEqual([]);
      }),
      { numRuns: 120, seed: 20261202 },
    );
  });

  it('leaves out exactly the orders heavier or bulkier than the cart', () => {
    fc.assert(
      fc.property(ordersArb, cartArb, methodArb, (orders, cart, batching) => {
        const wave = planWave({
          orders,
          cart,
          batching,
          depotNode: floor.depotNode,
          distance: floor.distance,
          routing: { method: 'nearest-neighbor', improve: 'none' },
        });
        const expected = orders
          .filter((o) => {
            const kg = o.lines.reduce((s, l) => s + l.qty * l.unitKg, 0);
            const litres = o.lines.reduce((s, l) => s + l.qty * l.unitLitres, 0);
            return kg > cart.maxKg || litres > cart.maxLitres * (1 + 1e-9);
          })
          .map((o) => o.ref);
        expect(wave.unplaced.map((u) => u.order)).toEqual(expected);
        for (const u of wave.unplaced) expect(['too_heavy', 'too_voluminous']).toContain(u.code);
      }),
      { numRuns: 120, seed: 7 },
    );
  });

  it('never walks more with savings than with one order per trip on the same orders', () => {
    fc.assert(
      // At most 3 totes of 5 lines: every trip has ≤ 15 stops, so exact routing applies to all of them.
      fc.property(
        ordersArb,
        cartArb.map((c) => ({ ...c, totes: Math.min(c.totes, 3) })),
        (orders, cart) => {
          const wave = planWave({ orders, cart, batching: 'savings', depotNode: floor.depotNode, distance: floor.distance, routing: { method: 'exact' } });
          expect(wave.notes).toEqual([]);
          // With exact routing both figures are sums of optimal circuits; splicing two circuits at the
          // depot is a circuit through the union, so an optimal one through the union is never longer.
          expect(wave.totals.metres).toBeLessThanOrEqual(wave.totals.singleMetres + 1e-6);
        },
      ),
      { numRuns: 60, seed: 99 },
    );
  });
});
