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

/** Two neighbouring aisles and the rack sides that stand between their centre lines. */
interface NeighbourPair {
  left: number;
  right: number;
  pitchM: number;
  /** 0, 1 or 2: the left aisle's R side and the right aisle's L side, counted when they hold bins. */
  rackSides: number;
}

/**
 * Each pick aisle with its nearest neighbour to the right (larger x) whose stretch overlaps its own
 * along y, and how many rack sides stand between them.
 * O(A² + B) for A aisles and B bins.
 */
function neighbourPairs(plan: Pick<PlanGeometry, 'aisles' | 'bins'>): NeighbourPair[] {
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
  const pairs: NeighbourPair[] = [];
  for (let k = 0; k < order.length; k++) {
    const li = order[k]!;
    const l = plan.aisles[li]!;
    const [l0, l1] = [Math.min(l.yStart, l.yEnd), Math.max(l.yStart, l.yEnd)];
    for (let m = k + 1; m < order.length; m++) {
      const ri = order[m]!;
      const r = plan.aisles[ri]!;
      const [r0, r1] = [Math.min(r.yStart, r.yEnd), Math.max(r.yStart, r.yEnd)];
      if (Math.min(l1, r1) - Math.max(l0, r0) <= POSITION_TOLERANCE_M) continue;
      pairs.push({ left: li, right: ri, pitchM: r.x - l.x, rackSides: hasR[li]! + hasL[ri]! });
      break;
    }
  }
  return pairs;
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
  const pairs: CrowdedAislePair[] = [];
  for (const p of neighbourPairs(plan)) {
    const clear = p.pitchM - p.rackSides * rackDepthM;
    if (p.rackSides > 0 && clear < MIN_WALKING_WIDTH_M - POSITION_TOLERANCE_M)
      pairs.push({ left: p.left, right: p.right, pitchM: p.pitchM, clearM: Math.max(0, clear) });
  }
  return pairs;
}

/** How the floor map draws racks: centre line to rack face, and rack depth (metres). */
export interface RackDrawing {
  aisleHalfWidth: number;
  rackDepth: number;
}

/** The walkway drawn when no neighbour limits it (an aisle alone, or wide apart): 3 m wide. */
export const DRAWN_HALF_WIDTH_MAX_M = 1.5;
/** The narrowest walkway half width drawn, so a crowded plan still shows its centre lines between racks. */
export const DRAWN_HALF_WIDTH_MIN_M = 0.3;

/**
 * Rack depth and walkway half width that fit the plan's tightest aisle pitch, so neighbouring racks
 * never overlap on the map: racks stay NOMINAL_RACK_DEPTH_M deep while the walkway between them is at
 * least 2 × DRAWN_HALF_WIDTH_MIN_M, the walkway narrowing to what the pitch leaves (pitch − racks,
 * the room crowdedAislePairs measures); on a plan tighter than that the racks are drawn shallower.
 * The drawing never hides a crowded plan: crowdedAislePairs still measures with the nominal depth.
 * O(A² + B) for A aisles and B bins.
 */
export function rackDrawing(plan: Pick<PlanGeometry, 'aisles' | 'bins'>, nominalDepthM = NOMINAL_RACK_DEPTH_M): RackDrawing {
  let halfWidth = DRAWN_HALF_WIDTH_MAX_M;
  let depth = nominalDepthM;
  for (const p of neighbourPairs(plan)) {
    // Between two centre lines: two walkway halves and `rackSides` racks.
    const hw = (p.pitchM - p.rackSides * nominalDepthM) / 2;
    if (hw >= DRAWN_HALF_WIDTH_MIN_M) halfWidth = Math.min(halfWidth, hw);
    else {
      // Too tight for nominal racks: a narrow walkway (at most a quarter of the pitch) and shallower racks.
      halfWidth = Math.min(halfWidth, DRAWN_HALF_WIDTH_MIN_M, Math.max(p.pitchM / 4, 0));
      if (p.rackSides > 0) depth = Math.min(depth, Math.max((p.pitchM - 2 * halfWidth) / p.rackSides, 0));
    }
  }
  return { aisleHalfWidth: halfWidth, rackDepth: depth };
}
