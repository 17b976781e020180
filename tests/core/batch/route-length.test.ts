/**
 * The batching engine's route-length estimate is the tour engine's nearest-neighbor circuit: computed
 * on the node table directly, it must give the same metres as `solveTour` with `nearest-neighbor` on
 * the matrix of the depot and the stops, ties included (the reference here is the tour engine itself,
 * a separate implementation, on exact distances of a generated floor and on hand-made ties).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { closeness, NodeTable } from '../../../server/core/batch/route-length';
import { matrixOf } from '../../../server/core/matrix';
import { solveTour } from '../../../server/core/tour/index';
import { floorOf } from './fixtures';

const floor = floorOf({ aisles: 6, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 8, levels: 2 });

function reference(table: NodeTable, stops: number[]): number {
  const ids = [0, ...stops];
  const k = ids.length;
  const d = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let j = i + 1; j < k; j++) d[i * k + j] = d[j * k + i] = table.d(ids[i]!, ids[j]!);
  return solveTour(matrixOf(k, d), { method: 'nearest-neighbor', improve: 'none', timeLimitMs: Infinity }).length;
}

describe('NodeTable.routeLength', () => {
  const nodes = [...new Set(floor.graph.binNode)].filter((v) => v !== floor.depotNode);
  const table = new NodeTable(floor.depotNode, nodes, floor.distance);

  it('gives the tour engine’s nearest-neighbor length on random stop sets', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: 1, max: table.size - 1 }), { minLength: 0, maxLength: 40 }), (list) => {
        const stops = [...list].sort((a, b) => a - b);
        expect(table.routeLength(Int32Array.from(stops))).toBe(stops.length === 0 ? 0 : reference(table, stops));
      }),
      { numRuns: 300, seed: 14 },
    );
  });

  it('breaks ties as the tour engine does (points at equal distances on a line)', () => {
    // Depot at 0; stops at ±3 and ±7 on a line: every step has a tie, resolved to the lower index.
    const pos = new Map([
      [0, 0],
      [1, 3],
      [2, -3],
      [3, 7],
      [4, -7],
      [5, 10],
    ]);
    const line = new NodeTable(0, [1, 2, 3, 4, 5], (a, b) => Math.abs(pos.get(a)! - pos.get(b)!));
    for (const stops of [
      [1, 2],
      [1, 2, 3, 4],
      [2, 3, 5],
      [1, 2, 3, 4, 5],
    ]) {
      expect(line.routeLength(Int32Array.from(stops))).toBe(reference(line, stops));
    }
    // Hand check (common practice: nearest neighbor, ties to the lower index): 3 and −3 tie, node 1 first;
    // 0 → 3 → 7 → 10 → −3 → −7 → 0.
    expect(line.routeLength(Int32Array.from([1, 2, 3, 4, 5]))).toBe(3 + 4 + 3 + 13 + 4 + 7);
    // Nodes 1 (3) and 2 (−3) tie from the depot: 0 → 3 → −3 → 0 either way round.
    expect(line.routeLength(Int32Array.from([1, 2]))).toBe(3 + 6 + 3);
  });

  it('measures closeness as the walk to the other order’s nearest stop, both ways', () => {
    const pos = new Map([
      [0, 0],
      [1, 2],
      [2, 5],
      [3, 9],
    ]);
    const line = new NodeTable(0, [1, 2, 3], (a, b) => Math.abs(pos.get(a)! - pos.get(b)!));
    // {1} ↔ {2, 3}: 1 → 2 is 3 m; 2 → 1 is 3 m, 3 → 1 is 7 m: 3 + 10.
    expect(closeness(line, Int32Array.from([1]), Int32Array.from([2, 3]))).toBe(13);
  });
});
