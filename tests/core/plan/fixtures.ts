/**
 * Shared helpers for the plan tests and the plan bench: seeded irregular plans and the same walk
 * graph rebuilt as a graphology graph, so distances can be checked against graphology-shortest-path.
 */
import { UndirectedGraph } from 'graphology';
import { bidirectional, singleSource } from 'graphology-shortest-path/dijkstra';
import type { Rng } from '../../../server/core/rng';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { PlanClosure, PlanGeometry } from '../../../server/core/plan/types';
import type { WalkGraph } from '../../../server/core/plan/walk-graph';

export interface RandomPlan {
  plan: PlanGeometry;
  closures: PlanClosure[];
}

const uniform = (rng: Rng, lo: number, hi: number): number => lo + (hi - lo) * rng.next();

/**
 * A small generated plan made irregular: some aisles shortened at either end (so they may miss a
 * cross aisle), some cross aisles covering only part of the aisles, an extra depot dropped anywhere,
 * and 0–3 random closures on aisles or cross aisles.
 */
export function randomIrregularPlan(rng: Rng): RandomPlan {
  const middle = rng.int(3);
  const front = rng.next() < 0.85;
  const back = rng.next() < 0.7;
  const base = generateRectangularPlan({
    aisles: 2 + rng.int(5),
    aisleLengthM: Math.round(uniform(rng, 15, 40)),
    aisleSpacingM: Math.round(uniform(rng, 25, 45)) / 10,
    baysPerAisle: 2 + rng.int(7),
    levels: 1 + rng.int(2),
    bothSides: rng.next() < 0.7,
    // At least one cross aisle, or the generator refuses the plan.
    crossAisles: { front: front || (!back && middle === 0), back, middle },
    depot: rng.next() < 0.5 ? { at: 'front_left' } : { at: 'front_centre' },
  });
  const L = base.aisles[0]!.yEnd;
  const aisles = base.aisles.map((a) => {
    const roll = rng.next();
    if (roll < 0.2) return { ...a, yEnd: uniform(rng, L * 0.4, L) };
    if (roll < 0.3) return { ...a, yStart: uniform(rng, 0, L * 0.5) };
    return a;
  });
  const byCode = new Map(aisles.map((a) => [a.code, a]));
  const bins = base.bins.filter((b) => {
    const a = byCode.get(b.aisle)!;
    return b.y >= a.yStart && b.y <= a.yEnd;
  });
  const xLast = aisles[aisles.length - 1]!.x;
  const crossAisles = base.crossAisles.map((c) => {
    if (rng.next() < 0.3) {
      const lo = uniform(rng, 0, xLast * 0.6);
      return { ...c, xStart: lo, xEnd: uniform(rng, lo, xLast) };
    }
    return c;
  });
  const depots = [...base.depots];
  if (rng.next() < 0.5) depots.push({ code: 'D2', x: uniform(rng, -1, xLast + 1), y: uniform(rng, -3, L + 3) });

  const closures: PlanClosure[] = [];
  const count = rng.int(4);
  for (let k = 0; k < count; k++) {
    if (rng.next() < 0.7 || crossAisles.length === 0) {
      const a = aisles[rng.int(aisles.length)]!;
      const from = uniform(rng, a.yStart, a.yEnd);
      closures.push({ kind: 'aisle', code: a.code, from, to: from + uniform(rng, 0.5, 8) });
    } else {
      const c = crossAisles[rng.int(crossAisles.length)]!;
      const from = uniform(rng, c.xStart, c.xEnd);
      closures.push({ kind: 'cross_aisle', code: c.code, from, to: from + uniform(rng, 0.5, 4) });
    }
  }
  return { plan: { aisles, crossAisles, bins, depots }, closures };
}

/** The walk graph as a graphology undirected graph: node keys are node ids as strings, edge attribute `weight` in metres. */
export function toGraphology(graph: WalkGraph): UndirectedGraph {
  const g = new UndirectedGraph();
  for (let u = 0; u < graph.nodeCount; u++) g.addNode(String(u));
  for (let u = 0; u < graph.nodeCount; u++) {
    for (let k = graph.offsets[u]!; k < graph.offsets[u + 1]!; k++) {
      const v = graph.targets[k]!;
      if (u < v) g.addEdge(String(u), String(v), { weight: graph.lengths[k]! });
    }
  }
  return g;
}

/** Length in metres of a graphology node path (sum of its edges' `weight`). */
export function pathLength(g: UndirectedGraph, path: readonly string[]): number {
  let sum = 0;
  for (let i = 1; i < path.length; i++) sum += g.getEdgeAttribute(g.edge(path[i - 1]!, path[i]!)!, 'weight') as number;
  return sum;
}

/** Reference distances from one source by graphology-shortest-path's single-source Dijkstra; Infinity where unreached. */
export function referenceDistancesFrom(g: UndirectedGraph, source: number, n: number): Float64Array {
  const paths = singleSource(g, String(source), 'weight');
  const out = new Float64Array(n).fill(Infinity);
  for (const [node, path] of Object.entries(paths)) out[Number(node)] = pathLength(g, path);
  return out;
}

/** Reference distance between two nodes by graphology-shortest-path's bidirectional Dijkstra; Infinity when no path. */
export function referenceDistance(g: UndirectedGraph, a: number, b: number): number {
  const path = bidirectional(g, String(a), String(b), 'weight') as string[] | null;
  return path ? pathLength(g, path) : Infinity;
}

/** Equal within floating-point summation noise (both sides add the same edge lengths in other orders). */
export function closeTo(a: number, b: number): boolean {
  if (a === b) return true;
  return Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
}
