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
