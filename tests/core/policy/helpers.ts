/**
 * Test helpers for the routing policies: random trips, the textbook block distances, and a checker that
 * a reported route is a real walk on the layout.
 */
import type { DistanceMatrix } from '../../../server/core/matrix';
import { matrixFromFunction } from '../../../server/core/matrix';
import type { BlockLayout } from '../../../server/core/policy/layout';
import { aisleLength, depthOf } from '../../../server/core/policy/layout';
import type { PolicyRoute, PolicyStop } from '../../../server/core/policy/types';
import type { Rng } from '../../../server/core/rng';

/** Stops uniform over the aisles and uniform along each aisle (continuous depth). */
export function randomStops(rng: Rng, layout: BlockLayout, count: number): PolicyStop[] {
  const L = aisleLength(layout);
  return Array.from({ length: count }, () => ({ aisle: rng.int(layout.aisleX.length), y: rng.next() * L }));
}

/**
 * Walking distances between the depot (point 0, on the front cross aisle at `depotX`) and the stops
 * (point i + 1). Single block, textbook formula (Bartholdi & Hackman, Warehouse & Distribution Science):
 * same aisle |y1 − y2|, else |x1 − x2| + min(y1 + y2, 2L − y1 − y2). With more blocks, the shortest way
 * between different aisles runs along one cross aisle c: min over c of |y1 − c| + |x1 − x2| + |y2 − c|
 * (common practice: a detour over a second cross aisle never shortens the vertical part).
 */
export function blockMatrix(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[]): DistanceMatrix {
  const L = aisleLength(layout);
  const pts = [{ x: depotX, d: 0, aisle: -1 }].concat(stops.map((s) => ({ x: layout.aisleX[s.aisle]!, d: depthOf(layout, s.y), aisle: s.aisle })));
  const c = layout.crossDepth;
  return matrixFromFunction(pts.length, (i, j) => {
    const p = pts[i]!;
    const q = pts[j]!;
    if (p.aisle === q.aisle && p.aisle >= 0) return Math.abs(p.d - q.d);
    if (layout.blocks === 1) return Math.abs(p.x - q.x) + Math.min(p.d + q.d, 2 * L - p.d - q.d);
    let best = Infinity;
    for (let k = 0; k < c.length; k++) best = Math.min(best, Math.abs(p.d - c[k]!) + Math.abs(p.x - q.x) + Math.abs(q.d - c[k]!));
    return best;
  });
}

/** Circuit through the matrix of `blockMatrix` in a policy's order: depot, then stops. */
export function circuitOf(order: readonly number[]): number[] {
  return [0, ...order.map((i) => i + 1)];
}

const EPS = 1e-7;

/**
 * Null when `route` is a real walk: it starts and ends at the depot's point, every segment runs along an
 * aisle centre line (inside the aisle) or along a cross aisle, it passes the stops in `route.order`
 * one after another, `order` lists every stop once, and `length` is the polyline's length.
 * Otherwise a description of the first problem.
 */
export function routeProblem(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], route: PolicyRoute): string | null {
  const L = aisleLength(layout);
  const path = route.path;
  const depot = { x: depotX, d: 0 };
  const pts = path.map((p) => ({ x: p.x, d: depthOf(layout, p.y) }));
  const same = (a: { x: number; d: number }, b: { x: number; d: number }): boolean => Math.abs(a.x - b.x) < EPS && Math.abs(a.d - b.d) < EPS;
  if (pts.length === 0 || !same(pts[0]!, depot) || !same(pts[pts.length - 1]!, depot)) return 'path does not start and end at the depot';
  let walked = 0;
  for (let k = 0; k + 1 < pts.length; k++) {
    const p = pts[k]!;
    const q = pts[k + 1]!;
    const dx = Math.abs(p.x - q.x);
    const dd = Math.abs(p.d - q.d);
    walked += dx + dd;
    if (dx > EPS && dd > EPS) return `segment ${k} is diagonal`;
    if (dd > EPS) {
      if (!layout.aisleX.some((x) => Math.abs(x - p.x) < EPS)) return `segment ${k} runs along y off every aisle (x = ${p.x})`;
      if (Math.min(p.d, q.d) < -EPS || Math.max(p.d, q.d) > L + EPS) return `segment ${k} leaves the aisle`;
    } else if (dx > EPS) {
      if (!Array.from(layout.crossDepth).some((c) => Math.abs(c - p.d) < EPS)) return `segment ${k} runs along x off every cross aisle`;
    }
  }
  if (Math.abs(walked - route.length) > 1e-6 * Math.max(1, walked)) return `length ${route.length} but the path is ${walked} m`;
  const sorted = [...route.order].sort((a, b) => a - b);
  if (sorted.length !== stops.length || sorted.some((v, i) => v !== i)) return 'order is not a permutation of the stops';
  // Each stop must lie on the path at or after the previous one.
  let seg = 0;
  let at = 0;
  for (const i of route.order) {
    const s = { x: layout.aisleX[stops[i]!.aisle]!, d: depthOf(layout, stops[i]!.y) };
    let found = false;
    for (let k = seg; k + 1 < pts.length && !found; k++) {
      const p = pts[k]!;
      const q = pts[k + 1]!;
      const len = Math.abs(p.x - q.x) + Math.abs(p.d - q.d);
      const onX = Math.abs(p.x - q.x) < EPS ? Math.abs(s.x - p.x) < EPS : Math.abs(s.d - p.d) < EPS;
      if (!onX) continue;
      const t = len === 0 ? 0 : (Math.abs(s.x - p.x) + Math.abs(s.d - p.d)) / len;
      const inside = Math.abs(Math.abs(s.x - p.x) + Math.abs(s.d - p.d) + Math.abs(s.x - q.x) + Math.abs(s.d - q.d) - len) < EPS;
      if (!inside || (k === seg && t < at - EPS)) continue;
      seg = k;
      at = t;
      found = true;
    }
    if (!found) return `stop ${i} is not on the path after the stops before it`;
  }
  return null;
}
