import { describe, expect, it } from 'vitest';
import { createRng } from '../../../server/core/rng';
import { validateMatrix } from '../../../server/core/matrix';
import { DistanceBudgetError, buildDistanceIndex, circuitPolyline, pairDistance, shortestPath, tripMatrix } from '../../../server/core/plan/distances';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { NODE_ACCESS, NODE_DEPOT, buildWalkGraph } from '../../../server/core/plan/walk-graph';
import type { WalkGraph } from '../../../server/core/plan/walk-graph';
import { closeTo, randomIrregularPlan, referenceDistance, referenceDistancesFrom, toGraphology } from './fixtures';
import { sitePlan } from '../../helpers/plans';

/** Access points and depots: the nodes whose distances the product stores. */
function stopNodes(g: WalkGraph): number[] {
  const out: number[] = [];
  for (let u = 0; u < g.nodeCount; u++) if (g.kind[u]! & (NODE_ACCESS | NODE_DEPOT)) out.push(u);
  return out;
}

describe('pairDistance against graphology-shortest-path', () => {
  it('equals Dijkstra on every pair of nodes of 150 random irregular plans with closures', () => {
    const rng = createRng(20261202);
    let pairs = 0;
    let unreachable = 0;
    let closed = 0;
    for (let t = 0; t < 150; t++) {
      const { plan, closures } = randomIrregularPlan(rng);
      closed += closures.length;
      const g = buildWalkGraph(plan, closures);
      const ix = buildDistanceIndex(g);
      const ref = toGraphology(g);
      for (let a = 0; a < g.nodeCount; a++) {
        // Reference: graphology-shortest-path singleSource Dijkstra (general-purpose library), path lengths summed.
        const expected = referenceDistancesFrom(ref, a, g.nodeCount);
        for (let b = 0; b < g.nodeCount; b++) {
          const got = pairDistance(ix, a, b);
          if (!closeTo(got, expected[b]!)) {
            throw new Error(`plan ${t}: d(${a}, ${b}) = ${got}, Dijkstra says ${expected[b]}`);
          }
          pairs++;
          if (got === Infinity) unreachable++;
        }
      }
    }
    // The sample has to exercise closures and disconnected parts, or the check proves little.
    expect(closed).toBeGreaterThan(100);
    expect(unreachable).toBeGreaterThan(0);
    expect(pairs).toBeGreaterThan(100_000);
  });

  it('equals bidirectional Dijkstra on sampled pairs of a larger plan with middle cross aisles', () => {
    const plan = sitePlan({ aisles: 12, aisleLengthM: 45, baysPerAisle: 30, levels: 2 }, 2);
    const closures = [
      { kind: 'aisle' as const, code: 'D', from: 3, to: 9 },
      { kind: 'cross_aisle' as const, code: 'middle-1', from: 10, to: 14 },
    ];
    const g = buildWalkGraph(plan, closures);
    const ix = buildDistanceIndex(g);
    const ref = toGraphology(g);
    const nodes = stopNodes(g);
    const rng = createRng(7);
    for (let k = 0; k < 300; k++) {
      const a = nodes[rng.int(nodes.length)]!;
      const b = nodes[rng.int(nodes.length)]!;
      // Reference: graphology-shortest-path bidirectional Dijkstra.
      expect(closeTo(pairDistance(ix, a, b), referenceDistance(ref, a, b))).toBe(true);
    }
  });
});

describe('pairDistance against the single-block closed form', () => {
  // Bartholdi & Hackman, Warehouse & Distribution Science: in one block with front and back cross
  // aisles, same aisle |y1 − y2|; different aisles |x1 − x2| + min(y1 + y2, 2L − y1 − y2), with y
  // measured from the front cross aisle and L the distance between the two cross aisles.
  it('matches the formula for every pair of bins on random single-block plans', () => {
    const rng = createRng(99);
    let checked = 0;
    for (let t = 0; t < 25; t++) {
      const L = 10 + rng.int(50);
      const plan = generateRectangularPlan({
        aisles: 1 + rng.int(8),
        aisleLengthM: L,
        aisleSpacingM: 2 + rng.int(4),
        baysPerAisle: 1 + rng.int(12),
        levels: 1,
        bothSides: rng.next() < 0.5,
        crossAisleWidthM: rng.next() * 4,
      });
      const g = buildWalkGraph(plan);
      const ix = buildDistanceIndex(g);
      const x = new Map(plan.aisles.map((a) => [a.code, a.x]));
      for (let i = 0; i < plan.bins.length; i++) {
        for (let j = 0; j < plan.bins.length; j++) {
          const p = plan.bins[i]!;
          const q = plan.bins[j]!;
          const formula = p.aisle === q.aisle ? Math.abs(p.y - q.y) : Math.abs(x.get(p.aisle)! - x.get(q.aisle)!) + Math.min(p.y + q.y, 2 * L - p.y - q.y);
          const got = pairDistance(ix, g.binNode[i]!, g.binNode[j]!);
          if (Math.abs(got - formula) > 1e-9) throw new Error(`plan ${t}: ${p.code} → ${q.code} is ${got} m, the formula says ${formula} m`);
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(10_000);
  });
});

describe('buildDistanceIndex', () => {
  it('keeps hubs to junctions and depots on a parallel-aisle plan', () => {
    const plan = generateRectangularPlan({
      aisles: 10,
      aisleLengthM: 30,
      aisleSpacingM: 3,
      baysPerAisle: 20,
      levels: 3,
      crossAisles: { front: true, back: true, middle: 1 },
    });
    const ix = buildDistanceIndex(buildWalkGraph(plan));
    // 10 aisles × 3 cross aisles, plus the depot; its link point is the front-left junction.
    expect(ix.hubCount).toBe(31);
  });

  it('returns Infinity between disconnected parts rather than throwing', () => {
    const plan = generateRectangularPlan({
      aisles: 2,
      aisleLengthM: 20,
      aisleSpacingM: 3,
      baysPerAisle: 3,
      levels: 1,
      crossAisles: { front: true, back: false },
    });
    const g = buildWalkGraph(plan, [{ kind: 'cross_aisle', code: 'front', from: 1, to: 2 }]);
    const ix = buildDistanceIndex(g);
    const a = g.binNode[0]!;
    const b = g.binNode[plan.bins.length - 1]!;
    expect(pairDistance(ix, a, b)).toBe(Infinity);
    expect(shortestPath(g, a, b)).toBeNull();
    expect(circuitPolyline(g, [a, b])).toBeNull();
  });

  it('is symmetric bit for bit and zero on the diagonal', () => {
    const { plan, closures } = randomIrregularPlan(createRng(3));
    const g = buildWalkGraph(plan, closures);
    const ix = buildDistanceIndex(g);
    for (let a = 0; a < g.nodeCount; a++) {
      expect(pairDistance(ix, a, a)).toBe(0);
      for (let b = 0; b < a; b++) expect(pairDistance(ix, a, b)).toBe(pairDistance(ix, b, a));
    }
  });

  it('gives a hub-free ring a hub of its own', () => {
    // A square of four degree-2 nodes: no junction, no depot, every degree is 2.
    const n = 4;
    const offsets = Int32Array.of(0, 2, 4, 6, 8);
    const targets = Int32Array.of(1, 3, 0, 2, 1, 3, 2, 0);
    const lengths = Float64Array.of(1, 4, 1, 2, 2, 3, 3, 4);
    const g: WalkGraph = {
      nodeCount: n,
      x: new Float64Array(n),
      y: new Float64Array(n),
      kind: new Uint8Array(n).fill(NODE_ACCESS),
      aisle: new Int32Array(n),
      crossAisle: new Int32Array(n).fill(-1),
      offsets,
      targets,
      lengths,
      binNode: Int32Array.of(0, 1, 2, 3),
      depotNode: new Int32Array(0),
      depotLink: new Int32Array(0),
    };
    const ix = buildDistanceIndex(g);
    expect(ix.hubCount).toBe(1);
    // Ring 0–1–2–3–0 with lengths 1, 2, 3, 4: d(0, 2) = min(1 + 2, 4 + 3), d(1, 3) = min(2 + 3, 1 + 4) (worked by hand).
    expect(pairDistance(ix, 0, 2)).toBe(3);
    expect(pairDistance(ix, 1, 3)).toBe(5);
    expect(pairDistance(ix, 2, 3)).toBe(3);
  });

  it('throws a DistanceBudgetError past its time budget or hub limit', () => {
    const g = buildWalkGraph(generateRectangularPlan({ aisles: 8, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 5, levels: 1 }));
    let now = 0;
    const clock = (): number => (now += 10);
    expect(() => buildDistanceIndex(g, { clock, budgetMs: 50 })).toThrow(DistanceBudgetError);
    expect(() => buildDistanceIndex(g, { maxHubs: 5 })).toThrow(expect.objectContaining({ code: 'too_many_hubs' }));
    expect(buildDistanceIndex(g, { clock: () => 0, budgetMs: 50 }).hubCount).toBe(17);
  });
});

describe('tripMatrix', () => {
  it('holds pairDistance for the listed nodes, depot first', () => {
    const plan = generateRectangularPlan({ aisles: 5, aisleLengthM: 25, aisleSpacingM: 3, baysPerAisle: 10, levels: 2 });
    const g = buildWalkGraph(plan);
    const ix = buildDistanceIndex(g);
    const nodes = [g.depotNode[0]!, g.binNode[3]!, g.binNode[57]!, g.binNode[120]!, g.binNode[199]!];
    const m = tripMatrix(ix, nodes);
    expect(m.n).toBe(5);
    const rows = Array.from({ length: 5 }, (_, i) => Array.from(m.d.subarray(i * 5, i * 5 + 5)));
    expect(validateMatrix(rows)).toBeNull();
    for (let i = 0; i < 5; i++) for (let j = 0; j < 5; j++) expect(m.d[i * 5 + j]).toBe(i === j ? 0 : pairDistance(ix, nodes[i]!, nodes[j]!));
  });
});

describe('shortestPath and circuitPolyline', () => {
  it.each([
    ['by Dijkstra', false],
    ['by descent on the index', true],
  ])('%s, walk along graph edges and measure exactly pairDistance', (_, useIndex) => {
    const rng = createRng(41);
    let walked = 0;
    for (let t = 0; t < 40; t++) {
      const { plan, closures } = randomIrregularPlan(rng);
      const g = buildWalkGraph(plan, closures);
      const ix = buildDistanceIndex(g);
      for (let k = 0; k < 30; k++) {
        const a = rng.int(g.nodeCount);
        const b = rng.int(g.nodeCount);
        const path = shortestPath(g, a, b, useIndex ? ix : undefined);
        const d = pairDistance(ix, a, b);
        if (d === Infinity) {
          expect(path).toBeNull();
          continue;
        }
        expect(path![0]).toBe(a);
        expect(path![path!.length - 1]).toBe(b);
        let len = 0;
        for (let i = 1; i < path!.length; i++) {
          let edge = -1;
          for (let e = g.offsets[path![i - 1]!]!; e < g.offsets[path![i - 1]! + 1]!; e++) if (g.targets[e] === path![i]) edge = e;
          expect(edge).toBeGreaterThanOrEqual(0);
          len += g.lengths[edge]!;
        }
        expect(closeTo(len, d)).toBe(true);
        walked++;
      }
    }
    expect(walked).toBeGreaterThan(500);
  });

  it('expands a closed circuit into a polyline from the depot back to the depot, as long as the circuit', () => {
    const plan = generateRectangularPlan({
      aisles: 6,
      aisleLengthM: 30,
      aisleSpacingM: 3,
      baysPerAisle: 12,
      levels: 1,
      crossAisles: { front: true, back: true, middle: 1 },
    });
    const g = buildWalkGraph(plan);
    const ix = buildDistanceIndex(g);
    const circuit = [g.depotNode[0]!, g.binNode[5]!, g.binNode[40]!, g.binNode[70]!, g.binNode[20]!];
    const line = circuitPolyline(g, circuit)!;
    const pts = line.length / 2;
    expect([line[0], line[1]]).toEqual([g.x[circuit[0]!], g.y[circuit[0]!]]);
    expect([line[2 * pts - 2], line[2 * pts - 1]]).toEqual([g.x[circuit[0]!], g.y[circuit[0]!]]);
    // Every walk edge is a straight segment, so the polyline's Euclidean length is the walk's length.
    let len = 0;
    for (let i = 1; i < pts; i++) len += Math.hypot(line[2 * i]! - line[2 * i - 2]!, line[2 * i + 1]! - line[2 * i - 1]!);
    let expected = 0;
    for (let i = 0; i < circuit.length; i++) expected += pairDistance(ix, circuit[i]!, circuit[(i + 1) % circuit.length]!);
    expect(len).toBeCloseTo(expected, 9);
    expect(circuitPolyline(g, circuit, false)!.length).toBeLessThan(line.length);
    // The index-guided expansion may pick another walk of equal length, so compare lengths, not points.
    const fast = circuitPolyline(g, circuit, true, ix)!;
    let fastLen = 0;
    for (let i = 1; i < fast.length / 2; i++) fastLen += Math.hypot(fast[2 * i]! - fast[2 * i - 2]!, fast[2 * i + 1]! - fast[2 * i - 1]!);
    expect(fastLen).toBeCloseTo(expected, 9);
  });
});
