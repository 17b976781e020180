/**
 * The engine's view of a floor plan, in metres on one flat coordinate system: x across the aisles,
 * y along them. Pick aisles run parallel to the y axis; cross aisles run parallel to the x axis.
 * Import (spreadsheet → this) and validation live outside core; core assumes a checked plan.
 */
export interface PlanAisle {
  /** Aisle code as the site writes it, e.g. "C". Unique in a plan. */
  code: string;
  /** Centre line x. */
  x: number;
  yStart: number;
  yEnd: number;
}

export interface PlanCrossAisle {
  code: string;
  /** Centre line y. */
  y: number;
  xStart: number;
  xEnd: number;
}

export interface PlanBin {
  /** Bin code, e.g. "C-07-03-2". Unique in a plan. */
  code: string;
  /** Code of the aisle whose centre line gives access. */
  aisle: string;
  /** Position along the aisle centre line (bay centre when given by bay). */
  y: number;
  bay: number | null;
  side: 'L' | 'R';
  level: number;
  zone: string | null;
}

export interface PlanDepot {
  code: string;
  x: number;
  y: number;
}

export interface PlanGeometry {
  aisles: PlanAisle[];
  crossAisles: PlanCrossAisle[];
  bins: PlanBin[];
  depots: PlanDepot[];
}

/** A closed stretch of an aisle (y range) or a cross aisle (x range); no walking through it. */
export interface PlanClosure {
  kind: 'aisle' | 'cross_aisle';
  /** Code of the aisle or cross aisle. */
  code: string;
  from: number;
  to: number;
}

/** Two positions closer than this (metres) along a centre line are one point. */
export const POSITION_TOLERANCE_M = 0.01;

/** How far a depot may lie from the nearest aisle or cross-aisle centre line and still connect. */
export const DEPOT_LINK_MAX_M = 5;

/**
 * Depth of the racks the floor map draws beside an aisle's centre line (metres). Plans carry no rack
 * depth; hand-picking shelving is commonly 0.6–1.2 m deep (common practice, not from a source).
 */
export const NOMINAL_RACK_DEPTH_M = 1.0;

/**
 * Clear width a picker on foot needs between facing racks (metres): about 1 m is common practice;
 * carts need more, and local rules and site procedures decide.
 */
export const MIN_WALKING_WIDTH_M = 1.0;

/** Two neighbouring aisles whose racks leave less than MIN_WALKING_WIDTH_M to walk between them. */
export interface CrowdedAislePair {
  /** Indices into plan.aisles; `left` has the smaller x. */
  left: number;
  right: number;
  /** Distance between the two centre lines (metres). */
  pitchM: number;
  /** Pitch less the nominal racks between the two centre lines, never below 0 (metres). */
  clearM: number;
}

/**
 * Neighbouring pick aisles (side by side along x, their y ranges overlapping) that sit closer than the
 * racks drawn on them allow: the racks between two centre lines — the right-hand racks of the left
 * aisle and the left-hand racks of the right one, each NOMINAL_RACK_DEPTH_M deep where that side holds
 * bins — leave pitch − racks, the width of each aisle in a regular layout; a pair is listed when that
 * is under MIN_WALKING_WIDTH_M.
 * O(A² + B) for A aisles and B bins.
 */
export function crowdedAislePairs(plan: Pick<PlanGeometry, 'aisles' | 'bins'>, rackDepthM = NOMINAL_RACK_DEPTH_M): CrowdedAislePair[] {
  const index = new Map(plan.aisles.map((a, i) => [a.code, i] as const));
  const hasL = new Uint8Array(plan.aisles.length);
  const hasR = new Uint8Array(plan.aisles.length);
  for (const b of plan.bins) {
    const i = index.get(b.aisle);
    if (i === undefined) continue;
    if (b.side === 'L') hasL[i] = 1;
    else hasR[i] = 1;
  }
  const order = plan.aisles.map((_, i) => i).sort((a, b) => plan.aisles[a]!.x - plan.aisles[b]!.x);
  const pairs: CrowdedAislePair[] = [];
  for (let k = 0; k < order.length; k++) {
    const li = order[k]!;
    const l = plan.aisles[li]!;
    const [l0, l1] = [Math.min(l.yStart, l.yEnd), Math.max(l.yStart, l.yEnd)];
    // The nearest aisle to the right whose stretch overlaps this one's.
    for (let m = k + 1; m < order.length; m++) {
      const ri = order[m]!;
      const r = plan.aisles[ri]!;
      const [r0, r1] = [Math.min(r.yStart, r.yEnd), Math.max(r.yStart, r.yEnd)];
      if (Math.min(l1, r1) - Math.max(l0, r0) <= POSITION_TOLERANCE_M) continue;
      const pitch = r.x - l.x;
      const racks = (hasR[li] ? rackDepthM : 0) + (hasL[ri] ? rackDepthM : 0);
      const clear = pitch - racks;
      if (racks > 0 && clear < MIN_WALKING_WIDTH_M - POSITION_TOLERANCE_M) pairs.push({ left: li, right: ri, pitchM: pitch, clearM: Math.max(0, clear) });
      break;
    }
  }
  return pairs;
}
