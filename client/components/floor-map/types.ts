/**
 * Props and events of the floor map components. Geometry comes straight from the engine's plan types
 * (metres, x across the aisles, y along them), so the map draws what the engine routes on.
 */
import type { PlanBin, PlanClosure, PlanGeometry } from '../../../shared/plan-geometry';
import type { Viewport } from './viewport';

export type { PlanBin, PlanClosure, PlanGeometry };

/** A point in plan coordinates (metres). */
export interface MapPoint {
  x: number;
  y: number;
}

/** One numbered stop of a trip, drawn as a marker over the route. */
export interface RouteStop {
  /** Stop number as the picker sees it (1-based). */
  n: number;
  /** Access point on the aisle centre line (metres). */
  x: number;
  y: number;
  /** Bin codes picked at this stop; highlighted on the map. */
  bins?: string[];
  /** Index of this stop in `points`; found by nearest point in order when absent. */
  pointIndex?: number;
}

/** A trip's walking path from the depot through its stops and back. */
export interface FloorMapRoute {
  /** Polyline of the walk, in walking order (metres). */
  points: MapPoint[];
  stops: RouteStop[];
  /** Stops 1..k are done: the path up to stop k is drawn as walked (dashed). Null: nothing walked. */
  walkedToStop?: number | null;
  /** Stop drawn as the big current marker. Null: none. */
  currentStop?: number | null;
}

export interface FloorMapProps {
  plan: PlanGeometry;
  closures?: PlanClosure[];
  route?: FloorMapRoute | null;
  /** Dark palette (dim light); light by default. */
  dark?: boolean;
  /** Half the walkable width of a pick aisle, centre line to rack face (metres); unset: fitted to the plan's aisle pitch (rackDrawing). */
  aisleHalfWidth?: number;
  /** Half the width of a cross aisle (metres). */
  crossAisleHalfWidth?: number;
  /** Rack depth behind the rack face (metres); unset: fitted to the plan's aisle pitch (rackDrawing). */
  rackDepth?: number;
  /** Extra bins to highlight (outlined and hatched), e.g. a wave's bins. */
  highlightBins?: string[];
  /** Bins filled by intensity from 0 to 1 (bin code → intensity), e.g. picks per bin as a heat map. */
  binHeat?: Record<string, number> | null;
  /** Pan, zoom, hover and tap. Off: the map is a picture (mini map). */
  interactive?: boolean;
  /** Show the zoom and fit buttons. */
  controls?: boolean;
  /** Show the built-in bin search box (the `search` slot replaces it). */
  searchBox?: boolean;
  /** What "fit" frames: the whole plan, or the route with its depot. */
  fitTo?: 'plan' | 'route';
  /** Draw y = 0 (the front) at the bottom of the screen, like a drawn plan. */
  yUp?: boolean;
  /** Stop markers: every stop numbered, or only the current one numbered and the rest as dots. */
  stopLabels?: 'all' | 'current';
  /** Fixed size in CSS pixels; by default the map fills its container. */
  width?: number;
  height?: number;
  /** Small map: fewer labels (aisle codes at the far end only, no cross-aisle or depot codes). */
  compact?: boolean;
  /** Accessible name of the map. */
  label?: string;
}

/** Payload of `bin-select`: the bin tapped or found by search. */
export interface BinSelectEvent {
  bin: PlanBin;
  /** Levels stacked at the same place (same aisle, side and position). */
  levelsHere: number;
  via: 'pointer' | 'search';
}

/** What the map exposes through a template ref. */
export interface FloorMapApi {
  /** Frames the plan (or the route, per `fitTo`). */
  fit: () => void;
  /** Centres on a bin and highlights it; false when the code is not on the plan. */
  focusBin: (code: string) => boolean;
  /** Zooms by a factor around the centre of the map. */
  zoomBy: (factor: number) => void;
  /** Drawing counters and times, for the benchmark and the harness. */
  stats: () => FloorMapStats;
  /** The plan point (metres) under a position in the map (CSS pixels from its top-left corner). */
  worldAt: (sx: number, sy: number) => MapPoint;
}

export interface FloorMapStats {
  bins: number;
  /** Times the plan was drawn as vectors (zoom, resize, pan past the cached margin). */
  staticRenders: number;
  /** Times the cached bitmap was reused (pan). */
  staticBlits: number;
  lastStaticRenderMs: number;
  /** Whole plan-layer draw of the last frame: a blit, or a vector render and its blit. */
  lastStaticDrawMs: number;
  lastOverlayMs: number;
  /** Plan-layer draws so far (one per frame that changed the view). */
  draws: number;
  /** Bin cells drawn in the last vector render (after culling). */
  lastBinsDrawn: number;
  indexBuildMs: number;
}

/**
 * The map's view, shared by its drawing and its gestures. A plain object, outside Vue's reactivity:
 * it changes on every frame of a gesture.
 */
export interface MapView {
  vp: Viewport;
  /** Until this `performance.now()` time a gesture is going on: a scaled blit of the plan will do. */
  interactingUntil: number;
}
