import { describe, expect, it } from 'vitest';
import { planWave } from '../../../server/core/batch/plan-wave';
import { floorOf, generateOrders } from './fixtures';

/**
 * The ranking reported by R. de Koster, E. van der Poort & M. Wolters, "Efficient orderbatching
 * methods in warehouses", IJPR 37(7), 1999: seed and Clarke–Wright savings batching walk less than
 * FCFS, which walks much less than one order per trip. Checked on generated waves (fixed seeds) of
 * 60 orders with 2–4 lines on a 10-aisle rectangular plan, the same routing for every method.
 */
describe('batching ranking on generated waves', () => {
  const floor = floorOf();
  const cart = { totes: 8, maxKg: 150, maxLitres: 400 };
  it.each([1, 2, 3, 4, 5])('seed %i: seed and savings < FCFS < one order per trip', (seed) => {
    const orders = generateOrders(floor, seed, { orders: 60, minLines: 2, maxLines: 4 });
    const metres = (batching: 'single' | 'fcfs' | 'seed' | 'savings'): number =>
      planWave({ orders, cart, batching, depotNode: floor.depotNode, distance: floor.distance }).totals.metres;
    const single = metres('single');
    const fcfs = metres('fcfs');
    expect(fcfs).toBeLessThan(single);
    expect(metres('seed')).toBeLessThan(fcfs);
    expect(metres('savings')).toBeLessThan(fcfs);
  });
});
