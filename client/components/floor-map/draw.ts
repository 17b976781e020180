/**
 * Canvas drawing of the floor map in screen space (CSS pixels; the caller sets the pixel ratio).
 * Sizes of markers and labels are in pixels so they read the same at every zoom; geometry goes
 * through the viewport. Only what intersects the screen is drawn.
 */
import type { PlanIndex } from './plan-index';
import { binRect, querySlots } from './plan-index';
import type { MapPalette } from './palette';
import type { StopState } from './route';
import type { FloorMapRoute, MapPoint, PlanClosure, PlanGeometry } from './types';
import { visibleWorldRect, type Viewport, type WorldRect } from './viewport';

export const MAP_FONT = "'IBM Plex Sans', system-ui, sans-serif";

export interface SceneGeometry {
  plan: PlanGeometry;
  index: PlanIndex;
  closures: readonly PlanClosure[];
  aisleHalfWidth: number;
  crossAisleHalfWidth: number;
  rackDepth: number;
  /** Small map: aisle codes at the front end only, no cross-aisle or depot codes. */
  compact: boolean;
}

export type BinDetail = 'runs' | 'slots' | 'levels';

/** Screen rectangle of a world rectangle: x, y top-left, w, h ≥ 0. */
function screenRect(vp: Viewport, r: WorldRect): [number, number, number, number] {
  const s = vp.scale;
  const x = vp.ox + r.minX * s;
  const y = vp.flipY ? vp.oy - r.maxY * s : vp.oy + r.minY * s;
  return [x, y, (r.maxX - r.minX) * s, (r.maxY - r.minY) * s];
}

function intersects(a: WorldRect, b: WorldRect): boolean {
  return a.minX <= b.maxX && a.maxX >= b.minX && a.minY <= b.maxY && a.maxY >= b.minY;
}

/**
 * Level of detail for bins at this zoom: merged rack runs when a bay is under 3 px long, one
 * footprint per bay when a level band would be under 3 px wide, every level band otherwise.
 */
export function binDetailAt(scale: number, typicalSlotLength: number, rackDepth: number, maxLevels: number): BinDetail {
  if (typicalSlotLength * scale < 3 || rackDepth * scale < 2) return 'runs';
  if (maxLevels <= 1 || (rackDepth / maxLevels) * scale < 3) return 'slots';
  return 'levels';
}

function label(ctx: CanvasRenderingContext2D, text: string, x: number, y: number, p: MapPalette, px: number): void {
  ctx.font = `600 ${px}px ${MAP_FONT}`;
  ctx.lineWidth = 3;
  ctx.strokeStyle = p.labelHalo;
  ctx.strokeText(text, x, y);
  ctx.fillStyle = p.label;
  ctx.fillText(text, x, y);
}

let scratch: Uint32Array = new Uint32Array(4096);

/**
 * Draws the plan (floor, racks, bins, closures, labels). Returns bins drawn and the detail used.
 * `inset`: pixels of the drawing that lie outside the visible screen on each side (the cached
 * bitmap's margin), so labels kept on screen are kept on the visible part.
 */
export function drawStaticScene(
  ctx: CanvasRenderingContext2D,
  g: SceneGeometry,
  p: MapPalette,
  vp: Viewport,
  width: number,
  height: number,
  maxLevels: number,
  inset = 0,
): { binsDrawn: number; detail: BinDetail } {
  const { plan, index } = g;
  const view = visibleWorldRect(vp, width, height, 24);
  ctx.fillStyle = p.background;
  ctx.fillRect(0, 0, width, height);

  // Walkable floor: one path, one fill.
  ctx.beginPath();
  const hw = g.aisleHalfWidth;
  for (const a of plan.aisles) {
    const r = { minX: a.x - hw, maxX: a.x + hw, minY: Math.min(a.yStart, a.yEnd), maxY: Math.max(a.yStart, a.yEnd) };
    if (intersects(r, view)) ctx.rect(...screenRect(vp, r));
  }
  const chw = g.crossAisleHalfWidth;
  for (const c of plan.crossAisles) {
    const r = { minX: Math.min(c.xStart, c.xEnd), maxX: Math.max(c.xStart, c.xEnd), minY: c.y - chw, maxY: c.y + chw };
    if (intersects(r, view)) ctx.rect(...screenRect(vp, r));
  }
  ctx.fillStyle = p.floor;
  ctx.fill();

  if (hw * vp.scale >= 4) {
    ctx.beginPath();
    for (const a of plan.aisles) {
      const r = { minX: a.x, maxX: a.x, minY: Math.min(a.yStart, a.yEnd), maxY: Math.max(a.yStart, a.yEnd) };
      if (!intersects(r, view)) continue;
      const [x, y, , h] = screenRect(vp, r);
      ctx.moveTo(Math.round(x) + 0.5, y);
      ctx.lineTo(Math.round(x) + 0.5, y + h);
    }
    ctx.strokeStyle = p.centreLine;
    ctx.lineWidth = 1;
    ctx.setLineDash([6, 6]);
    ctx.stroke();
    ctx.setLineDash([]);
  }

  const detail = binDetailAt(vp.scale, index.typicalSlotLength, g.rackDepth, maxLevels);
  let binsDrawn = 0;
  if (detail === 'runs') {
    ctx.beginPath();
    const rr = index.runRect;
    for (let k = 0; k < index.runCount; k++) {
      const r = { minX: rr[k * 4] as number, minY: rr[k * 4 + 1] as number, maxX: rr[k * 4 + 2] as number, maxY: rr[k * 4 + 3] as number };
      if (intersects(r, view)) ctx.rect(...screenRect(vp, r));
    }
    ctx.fillStyle = p.rackFill;
    ctx.fill();
  } else {
    const found = querySlots(index, view, scratch);
    scratch = found.out;
    const sr = index.slotRect;
    // Outlines cost more to rasterise than the fills; the gap between bays separates them until
    // bays are large on screen, and then few are in view.
    const edges = index.typicalSlotLength * vp.scale >= 40;
    // fillRect per rectangle: the rasteriser's fast path, much cheaper than one path of thousands of rects.
    if (detail === 'slots') {
      ctx.fillStyle = p.binFill;
      for (let k = 0; k < found.count; k++) {
        const s = found.out[k] as number;
        ctx.fillRect(
          ...screenRect(vp, { minX: sr[s * 4] as number, minY: sr[s * 4 + 1] as number, maxX: sr[s * 4 + 2] as number, maxY: sr[s * 4 + 3] as number }),
        );
        binsDrawn += index.slotBinCount[s] as number;
      }
    } else {
      // Neighbouring levels alternate fill, so bands read apart without a stroke per band;
      // two passes so the fill style is set twice, not once per band.
      for (const parity of [0, 1]) {
        ctx.fillStyle = parity === 0 ? p.binFill : p.binFillAlt;
        for (let k = 0; k < found.count; k++) {
          const s = found.out[k] as number;
          const first = index.slotFirstBin[s] as number;
          const count = index.slotBinCount[s] as number;
          for (let b = first + parity; b < first + count; b += 2) ctx.fillRect(...screenRect(vp, binRect(index, b)));
          if (parity === 0) binsDrawn += count;
        }
      }
    }
    if (edges) {
      ctx.beginPath();
      for (let k = 0; k < found.count; k++) {
        const s = found.out[k] as number;
        ctx.rect(...screenRect(vp, { minX: sr[s * 4] as number, minY: sr[s * 4 + 1] as number, maxX: sr[s * 4 + 2] as number, maxY: sr[s * 4 + 3] as number }));
      }
      ctx.strokeStyle = p.rackEdge;
      ctx.lineWidth = 1;
      ctx.stroke();
    }
  }

  drawClosures(ctx, g, p, vp, view);
  drawLabels(ctx, g, p, vp, view, inset);
  return { binsDrawn, detail };
}

function drawClosures(ctx: CanvasRenderingContext2D, g: SceneGeometry, p: MapPalette, vp: Viewport, view: WorldRect): void {
  for (const c of g.closures) {
    let r: WorldRect | null = null;
    if (c.kind === 'aisle') {
      const a = g.plan.aisles.find((x) => x.code === c.code);
      if (a) r = { minX: a.x - g.aisleHalfWidth, maxX: a.x + g.aisleHalfWidth, minY: Math.min(c.from, c.to), maxY: Math.max(c.from, c.to) };
    } else {
      const x = g.plan.crossAisles.find((y) => y.code === c.code);
      if (x) r = { minX: Math.min(c.from, c.to), maxX: Math.max(c.from, c.to), minY: x.y - g.crossAisleHalfWidth, maxY: x.y + g.crossAisleHalfWidth };
    }
    if (!r || !intersects(r, view)) continue;
    const [x, y, w0, h0] = screenRect(vp, r);
    // A closure stays visible as a mark even when zoomed far out.
    const w = Math.max(w0, 4);
    const h = Math.max(h0, 4);
    ctx.save();
    ctx.beginPath();
    ctx.rect(x, y, w, h);
    ctx.fillStyle = p.closureFill;
    ctx.fill();
    ctx.clip();
    ctx.beginPath();
    for (let d = -h; d < w; d += 7) {
      ctx.moveTo(x + d, y + h);
      ctx.lineTo(x + d + h, y);
    }
    ctx.strokeStyle = p.closureHatch;
    ctx.lineWidth = 1.5;
    ctx.stroke();
    ctx.restore();
    ctx.strokeStyle = p.closureHatch;
    ctx.lineWidth = 2;
    ctx.setLineDash([5, 3]);
    ctx.strokeRect(x, y, w, h);
    ctx.setLineDash([]);
    if (Math.max(w, h) >= 40) {
      const text = 'CLOSED';
      ctx.save();
      ctx.translate(x + w / 2, y + h / 2);
      if (h > w) ctx.rotate(-Math.PI / 2);
      ctx.textAlign = 'center';
      ctx.textBaseline = 'middle';
      ctx.font = `700 11px ${MAP_FONT}`;
      const tw = ctx.measureText(text).width + 8;
      ctx.fillStyle = p.closureFill;
      ctx.fillRect(-tw / 2, -8, tw, 16);
      ctx.fillStyle = p.closureText;
      ctx.fillText(text, 0, 0);
      ctx.restore();
    }
  }
}

/** Half the side of a depot's square marker, in screen pixels. */
const depotHalf = (compact: boolean): number => (compact ? 9 : 11);

/** Depots go on the route layer: a trip starts and ends there, and the marker must sit above its line. */
function drawDepots(ctx: CanvasRenderingContext2D, plan: PlanGeometry, p: MapPalette, vp: Viewport, view: WorldRect, compact: boolean): void {
  for (const d of plan.depots) {
    if (d.x < view.minX - 10 || d.x > view.maxX + 10 || d.y < view.minY - 10 || d.y > view.maxY + 10) continue;
    const sx = vp.ox + d.x * vp.scale;
    const sy = vp.oy + (vp.flipY ? -d.y : d.y) * vp.scale;
    drawDepotMarker(ctx, sx, sy, compact ? null : d.code, p, depotHalf(compact));
  }
}

/**
 * A depot is a square with "D" in it (shape and letter, not colour, tell it apart); its code goes
 * below it, off the row of aisle codes at the plan's front.
 */
export function drawDepotMarker(ctx: CanvasRenderingContext2D, sx: number, sy: number, code: string | null, p: MapPalette, half: number): void {
  ctx.fillStyle = p.depotFill;
  ctx.strokeStyle = p.labelHalo;
  ctx.lineWidth = 2;
  ctx.beginPath();
  ctx.rect(sx - half, sy - half, half * 2, half * 2);
  ctx.fill();
  ctx.stroke();
  ctx.fillStyle = p.depotText;
  ctx.font = `700 ${Math.round(half * 1.2)}px ${MAP_FONT}`;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'middle';
  ctx.fillText('D', sx, sy + 0.5);
  if (code) {
    // Below the marker: beside it, the code sat on the row of aisle letters at the front.
    ctx.textAlign = 'center';
    ctx.textBaseline = 'top';
    label(ctx, code, sx, sy + half + 3, p, 12);
    ctx.textBaseline = 'middle';
  }
  ctx.textAlign = 'left';
}

function drawLabels(ctx: CanvasRenderingContext2D, g: SceneGeometry, p: MapPalette, vp: Viewport, view: WorldRect, inset: number): void {
  const px = 12;
  ctx.font = `600 ${px}px ${MAP_FONT}`;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'middle';
  const aisles = g.plan.aisles
    .filter((a) => a.x >= view.minX - 5 && a.x <= view.maxX + 5)
    .slice()
    .sort((a, b) => a.x - b.x);
  const depots = g.plan.depots.map((d) => ({
    sx: vp.ox + d.x * vp.scale,
    sy: vp.oy + (vp.flipY ? -d.y : d.y) * vp.scale,
    half: depotHalf(g.compact),
  }));
  let lastRight = -Infinity;
  for (const a of aisles) {
    const sx = vp.ox + a.x * vp.scale;
    const w = ctx.measureText(a.code).width;
    // Skip a label that would overlap its neighbour; zooming in brings it back.
    if (sx - w / 2 < lastRight + 4) continue;
    lastRight = sx + w / 2;
    const lo = Math.min(a.yStart, a.yEnd);
    const hi = Math.max(a.yStart, a.yEnd);
    const ends: (readonly [number, number])[] = g.compact
      ? [[hi, 1]]
      : [
          [lo, -1],
          [hi, 1],
        ];
    for (const [yEnd, away] of ends) {
      const sy = vp.oy + (vp.flipY ? -yEnd : yEnd) * vp.scale;
      const dir = (vp.flipY ? -away : away) * (px * 0.9 + 2);
      // A depot marker sits on the front cross aisle: an aisle code it would cover is left to the aisle's other end.
      if (depots.some((d) => Math.abs(d.sx - sx) < d.half + w / 2 + 2 && Math.abs(d.sy - (sy + dir)) < d.half + px / 2 + 2)) continue;
      label(ctx, a.code, sx, sy + dir, p, px);
    }
  }
  ctx.textAlign = 'left';
  if (g.compact) return;
  for (const c of g.plan.crossAisles) {
    if (c.y < view.minY - 5 || c.y > view.maxY + 5) continue;
    const sx = vp.ox + Math.min(c.xStart, c.xEnd) * vp.scale;
    const sy = vp.oy + (vp.flipY ? -c.y : c.y) * vp.scale;
    const w = ctx.measureText(c.code).width;
    // Left of the plan when there is room there, else just inside its left end (halo keeps it legible).
    const x = Math.max(sx - 6, inset + w + 8);
    ctx.textAlign = 'right';
    label(ctx, c.code, x, sy, p, px);
  }
  ctx.textAlign = 'left';
}

/** Strokes the current path twice: `halo` 3 px wider underneath, then `colour` at `width` (dashed when `dash` is given). */
function strokeOverHalo(ctx: CanvasRenderingContext2D, halo: string, colour: string, width: number, dash?: number[]): void {
  ctx.strokeStyle = halo;
  ctx.lineWidth = width + 3;
  ctx.stroke();
  ctx.strokeStyle = colour;
  ctx.lineWidth = width;
  if (dash) ctx.setLineDash(dash);
  ctx.stroke();
  if (dash) ctx.setLineDash([]);
}

export interface OverlayScene {
  plan: PlanGeometry;
  compact: boolean;
  /** Pixels at the top covered by the map's tools; sticky labels go below them. */
  topInset: number;
  route: FloorMapRoute | null;
  walked: MapPoint[];
  remaining: MapPoint[];
  stopStates: StopState[];
  stopLabels: 'all' | 'current';
  index: PlanIndex;
  /** Bins outlined (indices into index.bins). */
  highlighted: readonly number[];
  /** Bins filled by intensity 0…1 (index into index.bins, intensity), e.g. picks per bin; drawn under everything else. */
  heat?: readonly (readonly [number, number])[];
  /** Bin found by search: outlined and ringed. -1: none. */
  focused: number;
  hovered: number;
}

function polyline(ctx: CanvasRenderingContext2D, vp: Viewport, pts: readonly MapPoint[]): void {
  ctx.beginPath();
  for (let i = 0; i < pts.length; i++) {
    const q = pts[i] as MapPoint;
    const sx = vp.ox + q.x * vp.scale;
    const sy = vp.oy + (vp.flipY ? -q.y : q.y) * vp.scale;
    if (i === 0) ctx.moveTo(sx, sy);
    else ctx.lineTo(sx, sy);
  }
}

/** Chevrons along the remaining path every ~90 px, so the walking direction reads without colour. */
function chevrons(ctx: CanvasRenderingContext2D, vp: Viewport, pts: readonly MapPoint[], colour: string): void {
  ctx.fillStyle = colour;
  let carry = 45;
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1] as MapPoint;
    const b = pts[i] as MapPoint;
    const ax = vp.ox + a.x * vp.scale;
    const ay = vp.oy + (vp.flipY ? -a.y : a.y) * vp.scale;
    const bx = vp.ox + b.x * vp.scale;
    const by = vp.oy + (vp.flipY ? -b.y : b.y) * vp.scale;
    const len = Math.hypot(bx - ax, by - ay);
    if (len === 0) continue;
    const ux = (bx - ax) / len;
    const uy = (by - ay) / len;
    let t = carry;
    while (t < len) {
      const cx = ax + ux * t;
      const cy = ay + uy * t;
      ctx.beginPath();
      ctx.moveTo(cx + ux * 5, cy + uy * 5);
      ctx.lineTo(cx - ux * 4 - uy * 5, cy - uy * 4 + ux * 5);
      ctx.lineTo(cx - ux * 4 + uy * 5, cy - uy * 4 - ux * 5);
      ctx.closePath();
      ctx.fill();
      t += 90;
    }
    carry = t - len;
  }
}

function outlineBin(ctx: CanvasRenderingContext2D, vp: Viewport, index: PlanIndex, b: number, colour: string, lw: number, minPx: number): [number, number] {
  const [x, y, w, h] = screenRect(vp, binRect(index, b));
  const cx = x + w / 2;
  const cy = y + h / 2;
  const ww = Math.max(w, minPx);
  const hh = Math.max(h, minPx);
  ctx.strokeStyle = colour;
  ctx.lineWidth = lw;
  ctx.strokeRect(cx - ww / 2, cy - hh / 2, ww, hh);
  return [cx, cy];
}

/**
 * Zoomed in, the codes at the aisle ends are off screen: repeat each visible aisle's code along the
 * top edge, and each cross aisle's at the left edge, so the picker always knows where they look.
 */
export function drawStickyLabels(
  ctx: CanvasRenderingContext2D,
  plan: PlanGeometry,
  p: MapPalette,
  vp: Viewport,
  width: number,
  height: number,
  topInset: number,
): void {
  const px = 12;
  const topY = topInset + px;
  ctx.textBaseline = 'middle';
  ctx.textAlign = 'center';
  let lastRight = -Infinity;
  const aisles = plan.aisles.slice().sort((a, b) => a.x - b.x);
  ctx.font = `600 ${px}px ${MAP_FONT}`;
  for (const a of aisles) {
    const sx = vp.ox + a.x * vp.scale;
    if (sx < 0 || sx > width) continue;
    const y0 = vp.oy + (vp.flipY ? -a.yStart : a.yStart) * vp.scale;
    const y1 = vp.oy + (vp.flipY ? -a.yEnd : a.yEnd) * vp.scale;
    const top = Math.min(y0, y1);
    const bottom = Math.max(y0, y1);
    // Only when the aisle crosses the label row and its top-end code is hidden.
    if (top > topY - px || bottom < topY) continue;
    const w = ctx.measureText(a.code).width;
    if (sx - w / 2 < lastRight + 6) continue;
    lastRight = sx + w / 2;
    label(ctx, a.code, sx, topY, p, px);
  }
  ctx.textAlign = 'left';
  for (const c of plan.crossAisles) {
    const sy = vp.oy + (vp.flipY ? -c.y : c.y) * vp.scale;
    if (sy < topY + px || sy > height) continue;
    const left = vp.ox + Math.min(c.xStart, c.xEnd) * vp.scale;
    const right = vp.ox + Math.max(c.xStart, c.xEnd) * vp.scale;
    if (left > 0 || right < 80) continue;
    label(ctx, c.code, 8, sy, p, px);
  }
}

/** Draws highlights, hover, the route and its stop markers. */
export function drawOverlayScene(ctx: CanvasRenderingContext2D, o: OverlayScene, p: MapPalette, vp: Viewport, width: number, height: number): void {
  const view = visibleWorldRect(vp, width, height, 40);
  const inView = (b: number): boolean => {
    const r = binRect(o.index, b);
    return intersects(r, view);
  };
  if (o.heat && o.heat.length > 0) {
    // Intensity as opacity of one hue, and a darker edge on the hottest bins, so it reads without colour vision.
    ctx.fillStyle = p.highlight;
    for (const [b, v] of o.heat) {
      if (!inView(b)) continue;
      const [x, y, w, h] = screenRect(vp, binRect(o.index, b));
      ctx.globalAlpha = 0.15 + 0.85 * Math.min(1, Math.max(0, v));
      ctx.fillRect(x, y, Math.max(w, 2), Math.max(h, 2));
    }
    ctx.globalAlpha = 1;
  }
  for (const b of o.highlighted) {
    if (inView(b)) outlineBin(ctx, vp, o.index, b, p.highlight, 2, 6);
  }

  const route = o.route;
  if (route) {
    ctx.lineJoin = 'round';
    ctx.lineCap = 'round';
    // Each part over a halo 3 px wider, so it reads over racks; the walked part dashed.
    if (o.remaining.length > 1) {
      polyline(ctx, vp, o.remaining);
      strokeOverHalo(ctx, p.labelHalo, p.routeRemaining, 4);
      chevrons(ctx, vp, o.remaining, p.routeRemaining);
    }
    if (o.walked.length > 1) {
      polyline(ctx, vp, o.walked);
      strokeOverHalo(ctx, p.labelHalo, p.routeWalked, 3, [7, 6]);
    }
  }
  drawDepots(ctx, o.plan, p, vp, view, o.compact);
  // Above the route lines (their halo keeps them legible), below the stop markers.
  if (!o.compact) drawStickyLabels(ctx, o.plan, p, vp, width, height, o.topInset);
  if (route) {
    ctx.textAlign = 'center';
    ctx.textBaseline = 'middle';
    // Current stop last so it sits on top.
    const order = route.stops.map((_, i) => i).sort((a, b) => Number(o.stopStates[a] === 'current') - Number(o.stopStates[b] === 'current'));
    for (const i of order) {
      const s = route.stops[i];
      if (!s) continue;
      const sx = vp.ox + s.x * vp.scale;
      const sy = vp.oy + (vp.flipY ? -s.y : s.y) * vp.scale;
      if (sx < -40 || sy < -40 || sx > width + 40 || sy > height + 40) continue;
      drawStopMarker(ctx, sx, sy, s.n, o.stopStates[i] ?? 'todo', o.stopLabels, p);
    }
    ctx.textAlign = 'left';
  }

  if (o.hovered >= 0) outlineBin(ctx, vp, o.index, o.hovered, p.hover, 2, 4);
  if (o.focused >= 0) {
    const [cx, cy] = outlineBin(ctx, vp, o.index, o.focused, p.highlight, 3, 8);
    ctx.beginPath();
    ctx.arc(cx, cy, 18, 0, Math.PI * 2);
    ctx.strokeStyle = p.currentRing;
    ctx.lineWidth = 2;
    ctx.setLineDash([4, 3]);
    ctx.stroke();
    ctx.setLineDash([]);
  }
}

/**
 * Stop markers: to-do = filled circle with its number; done = light circle with its number and a
 * tick; current = large amber circle with a dark ring and a bold number. With `stopLabels` 'current'
 * only the current stop carries a number and the others are small dots (done ones hollow).
 */
export function drawStopMarker(
  ctx: CanvasRenderingContext2D,
  sx: number,
  sy: number,
  n: number,
  state: StopState,
  stopLabels: 'all' | 'current',
  p: MapPalette,
): void {
  if (state === 'current') {
    const r = 18;
    ctx.beginPath();
    ctx.arc(sx, sy, r + 3, 0, Math.PI * 2);
    ctx.fillStyle = p.currentRing;
    ctx.fill();
    ctx.beginPath();
    ctx.arc(sx, sy, r, 0, Math.PI * 2);
    ctx.fillStyle = p.currentFill;
    ctx.fill();
    ctx.fillStyle = p.currentText;
    ctx.font = `700 ${n >= 100 ? 14 : 18}px ${MAP_FONT}`;
    ctx.fillText(String(n), sx, sy + 1);
    return;
  }
  if (stopLabels === 'current') {
    ctx.beginPath();
    ctx.arc(sx, sy, 4.5, 0, Math.PI * 2);
    ctx.lineWidth = 2;
    if (state === 'done') {
      ctx.fillStyle = p.stopDoneFill;
      ctx.fill();
      ctx.strokeStyle = p.routeWalked;
      ctx.stroke();
    } else {
      ctx.fillStyle = p.stopFill;
      ctx.fill();
      ctx.strokeStyle = p.labelHalo;
      ctx.stroke();
    }
    return;
  }
  const r = n >= 100 ? 13 : 11;
  ctx.beginPath();
  ctx.arc(sx, sy, r, 0, Math.PI * 2);
  ctx.fillStyle = state === 'done' ? p.stopDoneFill : p.stopFill;
  ctx.fill();
  ctx.lineWidth = 2;
  ctx.strokeStyle = state === 'done' ? p.routeWalked : p.labelHalo;
  ctx.stroke();
  ctx.fillStyle = state === 'done' ? p.stopDoneText : p.stopText;
  ctx.font = `700 12px ${MAP_FONT}`;
  ctx.fillText(String(n), sx, sy + 0.5);
  if (state === 'done') {
    // Tick at the upper right: "done" reads without colour.
    ctx.beginPath();
    ctx.moveTo(sx + r - 6, sy - r + 1);
    ctx.lineTo(sx + r - 3, sy - r + 4);
    ctx.lineTo(sx + r + 3, sy - r - 3);
    ctx.strokeStyle = p.stopDoneText;
    ctx.lineWidth = 2;
    ctx.stroke();
  }
}
