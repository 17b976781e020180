import { describe, expect, it } from 'vitest';
import { circuitLength } from '../../../server/core/matrix';
import { nearestNeighbor } from '../../../server/core/tour/construct';
import { isCircuit } from '../../helpers/instances';
import { geo, loadTour, loadTsp, parseTour, TSPLIB_OPTIMA, TSPLIB_WITH_TOUR } from '../../helpers/tsplib';

describe('TSPLIB reader', () => {
  // Each .opt.tour sums to its published optimum (TSPLIB README table, Reinelt 1991).
  it.each(TSPLIB_WITH_TOUR)('%s.opt.tour sums to the published optimum', (name) => {
    const { matrix } = loadTsp(name);
    const tour = loadTour(name);
    expect(isCircuit(tour, matrix.n, tour[0])).toBe(true);
    expect(circuitLength(matrix, tour)).toBe(TSPLIB_OPTIMA[name]);
  });

  it('reads every instance at its declared dimension', () => {
    // Dimensions from the TSPLIB README table.
    const dims: Record<string, number> = { burma14: 14, ulysses16: 16, ulysses22: 22, att48: 48, eil51: 51, berlin52: 52, st70: 70, kroA100: 100 };
    for (const [name, n] of Object.entries(dims)) expect(loadTsp(name).matrix.n).toBe(n);
  });

  it('names an instance by its file, not its NAME header (ulysses16.tsp says "ulysses16.tsp")', () => {
    expect(loadTsp('ulysses16').name).toBe('ulysses16');
  });

  it('accepts several cities per line and a tour ending in EOF without -1', () => {
    expect(parseTour('NAME : x\nTOUR_SECTION\n1 3\n2 4\nEOF\n')).toEqual([0, 2, 1, 3]);
  });

  it('truncates GEO degrees rather than rounding them', () => {
    // TSPLIB FAQ correction (README of reference/tsplib): 0.50 is 0° 50′ = 0.8333°, not 1° − 50′.
    // Along a meridian the distance is R·Δφ = 6378.388 × 0.8333 × π/180 ≈ 92.77 km; GEO adds 1 and truncates.
    expect(geo([0.5, 0], [0, 0])).toBe(93);
  });

  it('gives 4048 for nearest neighbor from city 1 on burma14', () => {
    // Check value measured on these files, reported independently elsewhere (README, "Check values").
    const { matrix } = loadTsp('burma14');
    expect(circuitLength(matrix, nearestNeighbor(matrix, 0))).toBe(4048);
  });
});
