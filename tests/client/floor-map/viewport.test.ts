// @vitest-environment node
import fc from 'fast-check';
import Konva from 'konva';
import { describe, expect, it } from 'vitest';
import {
  cachedPlacement,
  centreOn,
  fitViewport,
  panBy,
  pinchViewport,
  screenToWorld,
  visibleWorldRect,
  wheelFactor,
  worldToScreen,
  zoomAt,
  type Viewport,
} from '../../../client/components/floor-map/viewport';

const coord = fc.double({ min: -500, max: 500, noNaN: true });
const scale = fc.double({ min: 0.5, max: 200, noNaN: true });
const viewport = fc.record({ scale, ox: coord, oy: coord, flipY: fc.boolean() });

/** Reference: Konva's own affine Transform (konva, a library already in package.json). */
function konvaTransform(vp: Viewport): Konva.Transform {
  return new Konva.Transform().translate(vp.ox, vp.oy).scale(vp.scale, vp.flipY ? -vp.scale : vp.scale);
}

describe('environment', () => {
  it('runs without a DOM, so the helpers stay pure', () => {
    expect(typeof document).toBe('undefined');
  });
});

describe('world ↔ screen', () => {
  it('maps a world point where Konva.Transform maps it, and back through its inverse', () => {
    fc.assert(
      fc.property(viewport, coord, coord, (vp, x, y) => {
        const t = konvaTransform(vp);
        const want = t.point({ x, y });
        const got = worldToScreen(vp, x, y);
        expect(got.x).toBeCloseTo(want.x, 6);
        expect(got.y).toBeCloseTo(want.y, 6);
        const back = t.copy().invert().point(got);
        const ours = screenToWorld(vp, got.x, got.y);
        expect(ours.x).toBeCloseTo(back.x, 6);
        expect(ours.y).toBeCloseTo(back.y, 6);
        expect(ours.x).toBeCloseTo(x, 6);
        expect(ours.y).toBeCloseTo(y, 6);
      }),
    );
  });

  it('draws the front (y = 0) below the back when flipY is on', () => {
    const vp: Viewport = { scale: 10, ox: 0, oy: 500, flipY: true };
    expect(worldToScreen(vp, 0, 0).y).toBeGreaterThan(worldToScreen(vp, 0, 30).y);
  });

  it('visible rect contains exactly the world points that land on screen', () => {
    fc.assert(
      fc.property(viewport, fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (vp, u, v) => {
        const r = visibleWorldRect(vp, 800, 600);
        const p = screenToWorld(vp, u * 800, v * 600);
        expect(p.x).toBeGreaterThanOrEqual(r.minX - 1e-9);
        expect(p.x).toBeLessThanOrEqual(r.maxX + 1e-9);
        expect(p.y).toBeGreaterThanOrEqual(r.minY - 1e-9);
        expect(p.y).toBeLessThanOrEqual(r.maxY + 1e-9);
      }),
    );
  });
});

describe('fitViewport', () => {
  it('puts the whole rect on screen inside the padding and centres it', () => {
    const rect = { minX: -3, minY: -2, maxX: 197, maxY: 72 };
    for (const flipY of [true, false]) {
      const vp = fitViewport(rect, 1280, 800, flipY, 40);
      const a = worldToScreen(vp, rect.minX, rect.minY);
      const b = worldToScreen(vp, rect.maxX, rect.maxY);
      const [x0, x1] = [Math.min(a.x, b.x), Math.max(a.x, b.x)];
      const [y0, y1] = [Math.min(a.y, b.y), Math.max(a.y, b.y)];
      expect(x0).toBeGreaterThanOrEqual(40 - 1e-6);
      expect(x1).toBeLessThanOrEqual(1240 + 1e-6);
      expect(y0).toBeGreaterThanOrEqual(40 - 1e-6);
      expect(y1).toBeLessThanOrEqual(760 + 1e-6);
      // The limiting side touches its padding: 200 m across 1200 px is 6 px/m.
      expect(vp.scale).toBeCloseTo(6, 9);
      expect((x0 + x1) / 2).toBeCloseTo(640, 6);
      expect((y0 + y1) / 2).toBeCloseTo(400, 6);
    }
  });

  it('keeps a single point at a readable scale rather than infinity', () => {
    const vp = fitViewport({ minX: 5, minY: 5, maxX: 5, maxY: 5 }, 400, 300, false);
    expect(Number.isFinite(vp.scale)).toBe(true);
    expect(worldToScreen(vp, 5, 5)).toEqual({ x: 200, y: 150 });
  });
});

describe('zoomAt', () => {
  it('keeps the world point under the pointer fixed', () => {
    fc.assert(
      fc.property(viewport, fc.double({ min: 0.5, max: 2, noNaN: true }), coord, coord, (vp, f, px, py) => {
        const before = screenToWorld(vp, px, py);
        const next = zoomAt(vp, f, px, py, { min: 0.01, max: 1e6 });
        const after = worldToScreen(next, before.x, before.y);
        expect(after.x).toBeCloseTo(px, 6);
        expect(after.y).toBeCloseTo(py, 6);
        expect(next.scale).toBeCloseTo(vp.scale * f, 9);
      }),
    );
  });

  it('clamps the scale and still keeps the pointer point fixed', () => {
    const vp: Viewport = { scale: 100, ox: 10, oy: 20, flipY: true };
    const next = zoomAt(vp, 10, 300, 200, { min: 1, max: 150 });
    expect(next.scale).toBe(150);
    const w = screenToWorld(vp, 300, 200);
    expect(worldToScreen(next, w.x, w.y).x).toBeCloseTo(300, 9);
  });

  it('wheel up zooms in, wheel down zooms out, and equal opposite wheels cancel', () => {
    expect(wheelFactor(-100)).toBeGreaterThan(1);
    expect(wheelFactor(100)).toBeLessThan(1);
    expect(wheelFactor(120) * wheelFactor(-120)).toBeCloseTo(1, 12);
    // Line mode (deltaMode 1) counts 16 px per line.
    expect(wheelFactor(3, 1)).toBeCloseTo(wheelFactor(48), 12);
  });
});

describe('pinchViewport', () => {
  const start: Viewport = { scale: 8, ox: 100, oy: 400, flipY: true };

  it('pans without zooming when both pointers move together', () => {
    const next = pinchViewport(start, { x: 100, y: 100 }, { x: 200, y: 100 }, { x: 130, y: 80 }, { x: 230, y: 80 });
    expect(next.scale).toBeCloseTo(8, 12);
    expect(next.ox).toBeCloseTo(130, 9);
    expect(next.oy).toBeCloseTo(380, 9);
  });

  it('scales by the change in finger distance and keeps the start midpoint under the new midpoint', () => {
    fc.assert(
      fc.property(coord, coord, coord, coord, coord, coord, coord, coord, (ax, ay, bx, by, cx, cy, dx, dy) => {
        fc.pre(Math.hypot(bx - ax, by - ay) > 20 && Math.hypot(dx - cx, dy - cy) > 20);
        const next = pinchViewport(start, { x: ax, y: ay }, { x: bx, y: by }, { x: cx, y: cy }, { x: dx, y: dy }, { min: 1e-6, max: 1e6 });
        const ratio = Math.hypot(dx - cx, dy - cy) / Math.hypot(bx - ax, by - ay);
        expect(next.scale / start.scale).toBeCloseTo(ratio, 9);
        const w = screenToWorld(start, (ax + bx) / 2, (ay + by) / 2);
        const s = worldToScreen(next, w.x, w.y);
        expect(s.x).toBeCloseTo((cx + dx) / 2, 5);
        expect(s.y).toBeCloseTo((cy + dy) / 2, 5);
      }),
    );
  });
});

describe('centreOn and panBy', () => {
  it('puts the world point at the screen centre', () => {
    const vp = centreOn({ scale: 12, ox: 0, oy: 0, flipY: true }, 42, 17, 640, 480);
    expect(worldToScreen(vp, 42, 17)).toEqual({ x: 320, y: 240 });
    expect(worldToScreen(panBy(vp, 5, -7), 42, 17)).toEqual({ x: 325, y: 233 });
  });
});

describe('cachedPlacement', () => {
  const vp: Viewport = { scale: 6, ox: 40, oy: 700, flipY: true };
  const cache = { vp, width: 800, height: 600, margin: 256 };

  it('lands the bitmap exactly where it was drawn for the same viewport', () => {
    expect(cachedPlacement(cache, vp, 800, 600)).toEqual({ x: -256, y: -256, w: 1312, h: 1112, k: 1, covers: true });
  });

  it('still covers the screen after a pan within the margin, not beyond it', () => {
    expect(cachedPlacement(cache, panBy(vp, 200, -250), 800, 600).covers).toBe(true);
    expect(cachedPlacement(cache, panBy(vp, 257, 0), 800, 600).covers).toBe(false);
  });

  it('moves every cached pixel where the new viewport puts its world point', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 2, noNaN: true }), coord, coord, coord, coord, (f, px, py, wx, wy) => {
        const next = zoomAt(vp, f, px, py, { min: 0.01, max: 1e6 });
        const place = cachedPlacement(cache, next, 800, 600);
        // A world point sits in the bitmap at (its old screen position + margin); scale that by k.
        const old = worldToScreen(vp, wx, wy);
        const now = worldToScreen(next, wx, wy);
        expect(place.x + (old.x + 256) * place.k).toBeCloseTo(now.x, 6);
        expect(place.y + (old.y + 256) * place.k).toBeCloseTo(now.y, 6);
      }),
    );
  });

  it('never reuses a bitmap drawn with the other y direction', () => {
    expect(cachedPlacement(cache, { ...vp, flipY: false }, 800, 600).covers).toBe(false);
  });
});
