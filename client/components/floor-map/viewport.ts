/**
 * Viewport math of the floor map, free of the DOM so it unit-tests in Node.
 * World: plan metres. Screen: CSS pixels from the map's top-left corner.
 *   screenX = ox + x·scale;   screenY = oy + (flipY ? −y : y)·scale
 * With flipY the plan's front (y = 0) sits at the bottom, as plans are drawn.
 */
import type { MapPoint } from './types';

export interface Viewport {
  /** Pixels per metre. */
  scale: number;
  ox: number;
  oy: number;
  flipY: boolean;
}

export interface WorldRect {
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

export interface ScaleLimits {
  min: number;
  max: number;
}

export const DEFAULT_SCALE_LIMITS: ScaleLimits = { min: 0.2, max: 400 };

export function worldToScreen(vp: Viewport, x: number, y: number): MapPoint {
  return { x: vp.ox + x * vp.scale, y: vp.oy + (vp.flipY ? -y : y) * vp.scale };
}

export function screenToWorld(vp: Viewport, sx: number, sy: number): MapPoint {
  const y = (sy - vp.oy) / vp.scale;
  return { x: (sx - vp.ox) / vp.scale, y: vp.flipY ? -y : y };
}

/** The world rectangle visible in a width × height screen, grown by `marginPx` on every side. */
export function visibleWorldRect(vp: Viewport, width: number, height: number, marginPx = 0): WorldRect {
  const a = screenToWorld(vp, -marginPx, -marginPx);
  const b = screenToWorld(vp, width + marginPx, height + marginPx);
  return {
    minX: Math.min(a.x, b.x),
    minY: Math.min(a.y, b.y),
    maxX: Math.max(a.x, b.x),
    maxY: Math.max(a.y, b.y),
  };
}

function clamp(v: number, lo: number, hi: number): number {
  return v < lo ? lo : v > hi ? hi : v;
}

/**
 * Frames `rect` centred in the screen with `paddingPx` around it. A rect with no extent
 * (a single point) gets `limits.max` clipped to 20 px/m so one bin does not fill the screen.
 */
export function fitViewport(
  rect: WorldRect,
  width: number,
  height: number,
  flipY: boolean,
  paddingPx = 24,
  limits: ScaleLimits = DEFAULT_SCALE_LIMITS,
): Viewport {
  const w = Math.max(rect.maxX - rect.minX, 0);
  const h = Math.max(rect.maxY - rect.minY, 0);
  const availW = Math.max(width - 2 * paddingPx, 1);
  const availH = Math.max(height - 2 * paddingPx, 1);
  const raw = Math.min(w > 0 ? availW / w : Infinity, h > 0 ? availH / h : Infinity);
  const scale = clamp(Number.isFinite(raw) ? raw : 20, limits.min, limits.max);
  const cx = (rect.minX + rect.maxX) / 2;
  const cy = (rect.minY + rect.maxY) / 2;
  return centreOn({ scale, ox: 0, oy: 0, flipY }, cx, cy, width, height);
}

/** Same scale, moved so world (x, y) is at the centre of the screen. */
export function centreOn(vp: Viewport, x: number, y: number, width: number, height: number): Viewport {
  return {
    scale: vp.scale,
    ox: width / 2 - x * vp.scale,
    oy: height / 2 - (vp.flipY ? -y : y) * vp.scale,
    flipY: vp.flipY,
  };
}

export function panBy(vp: Viewport, dx: number, dy: number): Viewport {
  return { ...vp, ox: vp.ox + dx, oy: vp.oy + dy };
}

/**
 * Zooms by `factor` keeping the world point under screen (px, py) fixed, the way wheel zoom to
 * the pointer should feel. The scale is clamped to `limits`; the fixed point holds after clamping.
 */
export function zoomAt(vp: Viewport, factor: number, px: number, py: number, limits: ScaleLimits = DEFAULT_SCALE_LIMITS): Viewport {
  const scale = clamp(vp.scale * factor, limits.min, limits.max);
  const k = scale / vp.scale;
  return { scale, ox: px - (px - vp.ox) * k, oy: py - (py - vp.oy) * k, flipY: vp.flipY };
}

/** Wheel delta (pixels, as `WheelEvent.deltaY` in pixel mode) to a zoom factor; up zooms in. */
export function wheelFactor(deltaY: number, deltaMode = 0): number {
  const px = deltaMode === 1 ? deltaY * 16 : deltaMode === 2 ? deltaY * 400 : deltaY;
  return Math.exp(-clamp(px, -400, 400) * 0.0015);
}

/**
 * Two-pointer pinch: from the viewport at gesture start and both pointers then and now, the
 * viewport that keeps the world point under the start midpoint under the current midpoint,
 * scaled by the change in pointer distance.
 */
export function pinchViewport(start: Viewport, a0: MapPoint, b0: MapPoint, a1: MapPoint, b1: MapPoint, limits: ScaleLimits = DEFAULT_SCALE_LIMITS): Viewport {
  const d0 = Math.hypot(b0.x - a0.x, b0.y - a0.y);
  const d1 = Math.hypot(b1.x - a1.x, b1.y - a1.y);
  const factor = d0 > 0 ? d1 / d0 : 1;
  const m0 = { x: (a0.x + b0.x) / 2, y: (a0.y + b0.y) / 2 };
  const m1 = { x: (a1.x + b1.x) / 2, y: (a1.y + b1.y) / 2 };
  const zoomed = zoomAt(start, factor, m0.x, m0.y, limits);
  return panBy(zoomed, m1.x - m0.x, m1.y - m0.y);
}

export function unionRect(a: WorldRect | null, b: WorldRect): WorldRect {
  if (!a) return { ...b };
  return {
    minX: Math.min(a.minX, b.minX),
    minY: Math.min(a.minY, b.minY),
    maxX: Math.max(a.maxX, b.maxX),
    maxY: Math.max(a.maxY, b.maxY),
  };
}

export function rectOfPoints(points: readonly MapPoint[]): WorldRect | null {
  if (points.length === 0) return null;
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  for (const p of points) {
    if (p.x < minX) minX = p.x;
    if (p.y < minY) minY = p.y;
    if (p.x > maxX) maxX = p.x;
    if (p.y > maxY) maxY = p.y;
  }
  return { minX, minY, maxX, maxY };
}

/** A bitmap of the plan drawn at viewport `vp`, covering the screen grown by `margin` px per side. */
export interface CachedView {
  vp: Viewport;
  width: number;
  height: number;
  margin: number;
}

/**
 * Where the cached bitmap lands on screen under the current viewport: world points move by the
 * same scale ratio k and offset, so the bitmap is drawn at (x, y) with size (w, h). `covers` says
 * whether it fills the whole screen (otherwise the plan must be drawn again). Flip must match.
 */
export function cachedPlacement(
  cache: CachedView,
  vp: Viewport,
  width: number,
  height: number,
): { x: number; y: number; w: number; h: number; k: number; covers: boolean } {
  const k = vp.scale / cache.vp.scale;
  const x = vp.ox + (-cache.margin - cache.vp.ox) * k;
  const y = vp.oy + (-cache.margin - cache.vp.oy) * k;
  const w = (cache.width + 2 * cache.margin) * k;
  const h = (cache.height + 2 * cache.margin) * k;
  const covers = cache.vp.flipY === vp.flipY && x <= 0.5 && y <= 0.5 && x + w >= width - 0.5 && y + h >= height - 0.5;
  return { x, y, w, h, k, covers };
}
