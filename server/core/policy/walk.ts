/**
 * Shared plumbing of the policies: stops checked and sorted by aisle and block, and a walk that grows
 * an axis-parallel polyline while it adds up its length.
 */
import type { BlockLayout } from './layout';
import { aisleLength, depthOf, yOfDepth } from './layout';
import type { NotApplicable, PathPoint, PolicyName, PolicyStop } from './types';

/** Stops farther than this outside an aisle's span are rejected; nearer ones are clamped onto it. */
const STOP_SPAN_TOLERANCE_M = 1e-6;

export interface PreparedStops {
  /** Depth of each stop, metres from the front cross aisle, clamped onto the aisle. */
  depth: Float64Array;
  /**
   * Stop indices per (aisle, block), `cells[aisle * blocks + block]`, by ascending depth (ties by index).
   * A stop exactly on an inner cross aisle belongs to the block nearer the front.
   */
  cells: number[][];
}

/** Checks stops against the layout and sorts them into aisle × block cells. O(s log s + aisles · blocks). */
export function prepareStops(layout: BlockLayout, stops: readonly PolicyStop[]): PreparedStops | NotApplicable {
  const n = layout.aisleX.length;
  const B = layout.blocks;
  const c = layout.crossDepth;
  const L = aisleLength(layout);
  const depth = new Float64Array(stops.length);
  const cells: number[][] = Array.from({ length: n * B }, () => []);
  for (let i = 0; i < stops.length; i++) {
    const s = stops[i]!;
    if (!Number.isInteger(s.aisle) || s.aisle < 0 || s.aisle >= n) {
      return { reason: `stop ${i} names aisle index ${s.aisle}; the layout has aisles 0..${n - 1}` };
    }
    const d = depthOf(layout, s.y);
    if (!Number.isFinite(d) || d < -STOP_SPAN_TOLERANCE_M || d > L + STOP_SPAN_TOLERANCE_M) {
      return { reason: `stop ${i} at y = ${s.y} m lies outside aisle ${layout.aisleCodes[s.aisle]}` };
    }
    const dd = Math.min(L, Math.max(0, d));
    depth[i] = dd;
    let b = 0;
    while (b < B - 1 && dd > c[b + 1]!) b++;
    cells[s.aisle * B + b]!.push(i);
  }
  for (const cell of cells) cell.sort((a, b) => depth[a]! - depth[b]! || a - b);
  return { depth, cells };
}

/** A walk in layout coordinates (x, depth); every move is along an aisle or a cross aisle. */
export class Walk {
  private readonly xs: number[] = [];
  private readonly ds: number[] = [];
  readonly order: number[] = [];
  length = 0;

  constructor(x: number, depth: number) {
    this.xs.push(x);
    this.ds.push(depth);
  }

  get x(): number {
    return this.xs[this.xs.length - 1]!;
  }

  get depth(): number {
    return this.ds[this.ds.length - 1]!;
  }

  /** Straight move; a move that changes x and depth at once is a policy bug. */
  to(x: number, depth: number): void {
    const dx = Math.abs(x - this.x);
    const dd = Math.abs(depth - this.depth);
    if (dx === 0 && dd === 0) return;
    if (dx !== 0 && dd !== 0) throw new Error(`internal: diagonal move (${this.x}, ${this.depth}) → (${x}, ${depth})`);
    this.length += dx + dd;
    this.xs.push(x);
    this.ds.push(depth);
  }

  /** Walks to stop `i` along the current aisle and records the visit. */
  visit(i: number, x: number, depth: number): void {
    this.to(x, depth);
    this.order.push(i);
  }

  /** Plan-coordinate polyline; collinear interior points are kept (they are stops). */
  path(layout: BlockLayout): PathPoint[] {
    return this.xs.map((x, k) => ({ x, y: yOfDepth(layout, this.ds[k]!) }));
  }
}

/** Common layout checks of every policy; null when the layout is fine. */
export function checkLayout(method: PolicyName, singleBlockOnly: boolean, layout: BlockLayout, depotX: number): NotApplicable | null {
  if (!Number.isFinite(depotX)) return { reason: `depot x must be a finite number of metres, got ${depotX}` };
  if (singleBlockOnly && layout.blocks !== 1) {
    return {
      reason: `${method} is defined for single-block layouts (a front and a back cross aisle only); this layout has ${layout.blocks} blocks — use s-shape or a tour method`,
    };
  }
  return null;
}
