import type Konva from 'konva';
import { drawStaticScene, type SceneGeometry } from './draw';
import type { MapPalette } from './palette';
import type { MapView } from './types';
import { cachedPlacement, panBy, type CachedView } from './viewport';

/** Margin of the cached bitmap around the screen: pans shorter than this never redraw the plan. */
export const CACHE_MARGIN_PX = 256;

interface SceneCacheInputs {
  view: MapView;
  size: () => { width: number; height: number };
  geometry: () => SceneGeometry;
  palette: () => MapPalette;
  maxLevels: () => number;
  /** A picture never pans, so it needs no margin (and the tablet keeps the memory). */
  margin: () => number;
}

export interface SceneStats {
  staticRenders: number;
  staticBlits: number;
  lastStaticRenderMs: number;
  lastStaticDrawMs: number;
  lastBinsDrawn: number;
  draws: number;
}

type Cache = CachedView & { canvas: HTMLCanvasElement; dirty: boolean };

/**
 * The plan's off-screen bitmap: drawn with a margin around the screen, blitted under the current
 * transform while panning (and, scaled, mid-gesture), drawn again sharp when the view has moved off it.
 */
export function useSceneCache(inputs: SceneCacheInputs) {
  let cache: Cache | null = null;
  const stats: SceneStats = { staticRenders: 0, staticBlits: 0, lastStaticRenderMs: 0, lastStaticDrawMs: 0, lastBinsDrawn: 0, draws: 0 };

  function render(width: number, height: number): Cache {
    const margin = inputs.margin();
    const ratio = Math.min(typeof window !== 'undefined' ? window.devicePixelRatio || 1 : 1, 2);
    const canvas = cache?.canvas ?? document.createElement('canvas');
    const cw = Math.ceil((width + 2 * margin) * ratio);
    const ch = Math.ceil((height + 2 * margin) * ratio);
    if (canvas.width !== cw) canvas.width = cw;
    if (canvas.height !== ch) canvas.height = ch;
    // Opaque: the scene paints its own background, and an alpha-free bitmap blits faster.
    const ctx = canvas.getContext('2d', { alpha: false });
    const vp = inputs.view.vp;
    const shifted = panBy(vp, margin, margin);
    if (ctx) {
      ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
      const t0 = performance.now();
      const r = drawStaticScene(ctx, inputs.geometry(), inputs.palette(), shifted, width + 2 * margin, height + 2 * margin, inputs.maxLevels(), margin);
      stats.lastStaticRenderMs = performance.now() - t0;
      stats.lastBinsDrawn = r.binsDrawn;
    }
    stats.staticRenders++;
    cache = { canvas, vp: { ...vp }, width, height, margin, dirty: false };
    return cache;
  }

  /** The static layer's sceneFunc. */
  function draw(context: Konva.Context): void {
    const t0 = performance.now();
    const { width, height } = inputs.size();
    const vp = inputs.view.vp;
    let c = cache;
    let place = c && !c.dirty && c.width === width && c.height === height ? cachedPlacement(c, vp, width, height) : null;
    const exact = place !== null && place.covers && Math.abs(place.k - 1) < 1e-9;
    // Mid-gesture a scaled blit is fine; once the gesture settles the plan is drawn sharp.
    const roughOk = place !== null && place.covers && place.k > 0.5 && place.k < 2 && performance.now() < inputs.view.interactingUntil;
    if (!exact && !roughOk) {
      c = render(width, height);
      place = cachedPlacement(c, vp, width, height);
    } else {
      stats.staticBlits++;
    }
    if (c && place) {
      // A scaled mid-gesture blit is replaced within the settle time; nearest-neighbour is cheaper on a software canvas.
      context._context.imageSmoothingEnabled = exact;
      context.drawImage(c.canvas, place.x, place.y, place.w, place.h);
      context._context.imageSmoothingEnabled = true;
    }
    stats.lastStaticDrawMs = performance.now() - t0;
    stats.draws++;
  }

  /** When a pan ends more than half the margin off centre, mark the bitmap for a redraw now, while idle. */
  function recentre(): void {
    if (!cache || cache.margin === 0) return;
    const { width, height } = inputs.size();
    const place = cachedPlacement(cache, inputs.view.vp, width, height);
    const half = cache.margin / 2;
    if (Math.abs(place.x + cache.margin) > half || Math.abs(place.y + cache.margin) > half) cache.dirty = true;
  }

  function invalidate(): void {
    if (cache) cache.dirty = true;
  }

  /** Frees the bitmap at once; browsers keep large canvases alive until collected. */
  function free(): void {
    if (!cache) return;
    cache.canvas.width = 0;
    cache.canvas.height = 0;
    cache = null;
  }

  return { draw, recentre, invalidate, free, stats };
}
