/**
 * Random waves for the property tests: orders of 1–5 lines on random bins of a generated floor, with
 * random quantities, weights and volumes, and random carts. Everything is invented.
 */
import fc from 'fast-check';
import type { Order } from '../../../server/core/batch/types';
import type { Floor } from './fixtures';

/** Up to `maxOrders` orders on `floor`'s bins; every third one dated when `dueEvery3` is set. */
export function ordersArb(floor: Floor, maxOrders: number, dueEvery3 = false): fc.Arbitrary<Order[]> {
  const bins = floor.plan.bins.length;
  const lineArb = fc.record({
    bin: fc.integer({ min: 0, max: bins - 1 }),
    qty: fc.integer({ min: 1, max: 5 }),
    unitKg: fc.double({ min: 0, max: 15, noNaN: true }),
    unitLitres: fc.double({ min: 0, max: 25, noNaN: true }),
  });
  return fc.array(fc.array(lineArb, { minLength: 1, maxLength: 5 }), { minLength: 0, maxLength: maxOrders }).map((list): Order[] =>
    list.map((lines, i) => ({
      ref: `P${i}`,
      lines: lines.map((l, k) => ({
        sku: `S${l.bin}-${k}`,
        qty: l.qty,
        node: floor.graph.binNode[l.bin]!,
        bin: floor.plan.bins[l.bin]!.code,
        unitKg: l.unitKg,
        unitLitres: l.unitLitres,
      })),
      ...(dueEvery3 && i % 3 === 0 ? { due: 1000 - i } : {}),
    })),
  );
}
