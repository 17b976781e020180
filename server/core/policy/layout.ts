/**
 * The parallel-aisle view of a floor plan that the routing policies need: aisles side by side, cross
 * aisles across all of them, the depot on the front cross aisle. Policies work in "depth", metres from
 * the front cross aisle along the aisles, so a plan whose depot sits at its high-y end is the same
 * layout seen from the other side.
 */
import type { PlanClosure, PlanGeometry } from '../plan/types';
import { DEPOT_LINK_MAX_M, POSITION_TOLERANCE_M } from '../plan/types';
import type { NotApplicable, PolicyStop } from './types';

export interface BlockDepot {
  code: string;
  /** x of the depot's projection onto the front cross aisle. */
  x: number;
  /** Metres from the depot to that projection (walked twice per trip, not part of a policy's length). */
  offset: number;
}

export interface BlockLayout {
  /** Aisle centre-line x, ascending, metres. */
  readonly aisleX: Float64Array;
  /** Aisle codes in the same order as `aisleX`. */
  readonly aisleCodes: readonly string[];
  /** Aisle code → index into `aisleX`. */
  readonly aisleIndex: ReadonlyMap<string, number>;
  /** Cross-aisle centre-line y in plan coordinates, ascending. */
  readonly crossY: Float64Array;
  /** Cross-aisle depths from the front cross aisle, ascending: `crossDepth[0] = 0`, last = aisle length. */
  readonly crossDepth: Float64Array;
  /** Plan y of the front cross aisle (the end cross aisle the depot is on). */
  readonly frontY: number;
  /** +1 when depth grows with plan y (front at the lowest y), −1 when the front is the highest y. */
  readonly depthSign: 1 | -1;
  /** Blocks = cross aisles − 1. Block b lies between `crossDepth[b]` and `crossDepth[b + 1]`. */
  readonly blocks: number;
  /** The depots that project onto the front cross aisle; the one the layout was built for first. */
  readonly depots: readonly BlockDepot[];
}

/** Depth (metres from the front cross aisle) of a plan y. */
export function depthOf(layout: BlockLayout, y: number): number {
  return layout.depthSign * (y - layout.frontY);
}

/** Plan y of a depth. */
export function yOfDepth(layout: BlockLayout, depth: number): number {
  return layout.frontY + layout.depthSign * depth;
}

/** Aisle length from the front to the back cross aisle, metres. */
export function aisleLength(layout: BlockLayout): number {
  return layout.crossDepth[layout.crossDepth.length - 1]!;
}

export interface ToBlockLayoutOptions {
  /** Code of the depot trips start from; default the plan's first depot. */
  depot?: string;
  /** Closed stretches; policies assume every aisle and cross aisle is open end to end. */
  closures?: readonly PlanClosure[];
}

/**
 * Reads a plan as a parallel-aisle block layout, or says why the routing policies do not apply to it.
 * Conditions: at least one aisle and two cross aisles; aisle x distinct; every cross aisle spans every
 * aisle; every aisle runs from the first to the last cross aisle; no closures; the chosen depot within
 * `DEPOT_LINK_MAX_M` of one of the two end cross aisles (that one becomes the front). Positions are
 * compared to `POSITION_TOLERANCE_M`. O(aisles · cross aisles + depots).
 */
export function toBlockLayout(plan: PlanGeometry, options: ToBlockLayoutOptions = {}): BlockLayout | NotApplicable {
  const tol = POSITION_TOLERANCE_M;
  if (options.closures && options.closures.length > 0) {
    return { reason: 'the plan has closed aisle stretches; routing policies assume every aisle is open end to end' };
  }
  if (plan.aisles.length === 0) return { reason: 'the plan has no aisles' };
  if (plan.crossAisles.length < 2) {
    return { reason: 'routing policies need a front and a back cross aisle; the plan has fewer than two cross aisles' };
  }
  const aisles = [...plan.aisles].sort((a, b) => a.x - b.x);
  for (let i = 1; i < aisles.length; i++) {
    if (aisles[i]!.x - aisles[i - 1]!.x < tol) {
      return { reason: `aisles ${aisles[i - 1]!.code} and ${aisles[i]!.code} share the centre line x = ${aisles[i]!.x} m` };
    }
  }
  const cross = [...plan.crossAisles].sort((a, b) => a.y - b.y);
  for (let i = 1; i < cross.length; i++) {
    if (cross[i]!.y - cross[i - 1]!.y < tol) {
      return { reason: `cross aisles ${cross[i - 1]!.code} and ${cross[i]!.code} share the centre line y = ${cross[i]!.y} m` };
    }
  }
  const xMin = aisles[0]!.x;
  const xMax = aisles[aisles.length - 1]!.x;
  for (const c of cross) {
    const lo = Math.min(c.xStart, c.xEnd);
    const hi = Math.max(c.xStart, c.xEnd);
    if (lo > xMin + tol || hi < xMax - tol) {
      return { reason: `cross aisle ${c.code} (x ${lo}–${hi} m) does not span every aisle (x ${xMin}–${xMax} m)` };
    }
  }
  const yFirst = cross[0]!.y;
  const yLast = cross[cross.length - 1]!.y;
  for (const a of aisles) {
    const lo = Math.min(a.yStart, a.yEnd);
    const hi = Math.max(a.yStart, a.yEnd);
    if (Math.abs(lo - yFirst) > tol || Math.abs(hi - yLast) > tol) {
      return {
        reason: `aisle ${a.code} runs y ${lo}–${hi} m, not from the first cross aisle (y ${yFirst} m) to the last (y ${yLast} m)`,
      };
    }
  }
  if (plan.depots.length === 0) return { reason: 'the plan has no depot' };
  const chosen = options.depot === undefined ? plan.depots[0] : plan.depots.find((d) => d.code === options.depot);
  if (!chosen) return { reason: `the plan has no depot ${options.depot}` };

  const ends = [cross[0]!, cross[cross.length - 1]!];
  const linkTo = (c: (typeof ends)[number], x: number, y: number): { x: number; offset: number } => {
    const lo = Math.min(c.xStart, c.xEnd);
    const hi = Math.max(c.xStart, c.xEnd);
    const px = Math.min(hi, Math.max(lo, x));
    return { x: px, offset: Math.hypot(x - px, y - c.y) };
  };
  const toFirst = linkTo(ends[0]!, chosen.x, chosen.y);
  const toLast = linkTo(ends[1]!, chosen.x, chosen.y);
  const frontIsFirst = toFirst.offset <= toLast.offset;
  const front = frontIsFirst ? ends[0]! : ends[1]!;
  if (Math.min(toFirst.offset, toLast.offset) > DEPOT_LINK_MAX_M) {
    return {
      reason: `depot ${chosen.code} is more than ${DEPOT_LINK_MAX_M} m from both end cross aisles; policies need it on the front cross aisle`,
    };
  }
  const depots: BlockDepot[] = [];
  for (const d of [chosen, ...plan.depots.filter((d) => d !== chosen)]) {
    const link = linkTo(front, d.x, d.y);
    if (link.offset <= DEPOT_LINK_MAX_M) depots.push({ code: d.code, x: link.x, offset: link.offset });
  }

  const depthSign: 1 | -1 = frontIsFirst ? 1 : -1;
  const frontY = front.y;
  const crossY = Float64Array.from(cross, (c) => c.y);
  const crossDepth = Float64Array.from(cross, (c) => depthSign * (c.y - frontY)).sort();
  // Aisles end within tolerance of the end cross aisles; depth 0 and the last depth are exact by construction.
  crossDepth[0] = 0;
  const aisleCodes = aisles.map((a) => a.code);
  return {
    aisleX: Float64Array.from(aisles, (a) => a.x),
    aisleCodes,
    aisleIndex: new Map(aisleCodes.map((c, i) => [c, i])),
    crossY,
    crossDepth,
    frontY,
    depthSign,
    blocks: cross.length - 1,
    depots,
  };
}

export interface BlockLayoutParams {
  /** Number of aisles, ≥ 1; aisle i has its centre line at x = i × aisleSpacing. */
  aisles: number;
  /** Metres between neighbouring aisle centre lines, > 0. */
  aisleSpacing: number;
  /** Metres from the front to the back cross-aisle centre line, > 0. */
  aisleLength: number;
  /** Blocks between cross aisles, ≥ 1 (cross aisles = blocks + 1, evenly spaced). Default 1. */
  blocks?: number;
  /** x of the depot on the front cross aisle (y = 0). Default 0, the front of the first aisle. */
  depotX?: number;
}

/**
 * A block layout straight from numbers, for tests and generated studies: front cross aisle at y = 0,
 * aisle codes "1", "2", …; one depot "D" at (depotX, 0). Throws RangeError on non-positive sizes.
 */
export function blockLayoutOf(p: BlockLayoutParams): BlockLayout {
  const blocks = p.blocks ?? 1;
  const depotX = p.depotX ?? 0;
  if (!Number.isInteger(p.aisles) || p.aisles < 1) throw new RangeError(`aisles must be a positive integer, got ${p.aisles}`);
  if (!Number.isInteger(blocks) || blocks < 1) throw new RangeError(`blocks must be a positive integer, got ${blocks}`);
  if (!(p.aisleSpacing > 0) || !(p.aisleLength > 0) || !Number.isFinite(p.aisleSpacing) || !Number.isFinite(p.aisleLength)) {
    throw new RangeError('aisle spacing and aisle length must be positive numbers of metres');
  }
  if (!Number.isFinite(depotX)) throw new RangeError(`depot x must be a finite number of metres, got ${depotX}`);
  const aisleCodes = Array.from({ length: p.aisles }, (_, i) => String(i + 1));
  const crossDepth = Float64Array.from({ length: blocks + 1 }, (_, k) => (p.aisleLength * k) / blocks);
  return {
    aisleX: Float64Array.from({ length: p.aisles }, (_, i) => i * p.aisleSpacing),
    aisleCodes,
    aisleIndex: new Map(aisleCodes.map((c, i) => [c, i])),
    crossY: crossDepth.slice(),
    crossDepth,
    frontY: 0,
    depthSign: 1,
    blocks,
    depots: [{ code: 'D', x: depotX, offset: 0 }],
  };
}

/** The stop of a bin on this layout (aisle index, plan y), or null when its aisle is not in the layout. */
export function stopOfBin(layout: BlockLayout, bin: { aisle: string; y: number }): PolicyStop | null {
  const aisle = layout.aisleIndex.get(bin.aisle);
  return aisle === undefined ? null : { aisle, y: bin.y };
}
