import { describe, expect, it } from 'vitest';
import { binDetailAt, drawOverlayScene, drawStaticScene, type SceneGeometry } from '../../../client/components/floor-map/draw';
import { LIGHT_PALETTE } from '../../../client/components/floor-map/palette';
import { buildPlanIndex } from '../../../client/components/floor-map/plan-index';
import { splitRoute, stopState } from '../../../client/components/floor-map/route';
import { routeThrough } from '../../helpers/map-route';
import { fitViewport, visibleWorldRect, zoomAt } from '../../../client/components/floor-map/viewport';
import { generateRectangularPlan } from '../../../server/core/plan/generate';

const plan = generateRectangularPlan({ aisles: 40, aisleLengthM: 72, aisleSpacingM: 5, baysPerAisle: 50, levels: 5, crossAisles: { middle: 1 } });
const index = buildPlanIndex(plan, { aisleHalfWidth: 1.5, rackDepth: 1, crossAisleHalfWidth: 1.5 });
const geometry: SceneGeometry = { plan, index, closures: [], aisleHalfWidth: 1.5, crossAisleHalfWidth: 1.5, rackDepth: 1, compact: false };

function context(): CanvasRenderingContext2D {
  // vitest-canvas-mock (tests/client/setup.ts) gives happy-dom a 2D context that records calls.
  const ctx = document.createElement('canvas').getContext('2d');
  if (!ctx) throw new Error('no 2D context');
  return ctx;
}

/** Bins whose slot meets the rect, counted by a scan of the plan's bins (the oracle). */
function binsInView(rect: { minX: number; minY: number; maxX: number; maxY: number }): number {
  let n = 0;
  for (let s = 0; s < index.slotCount; s++) {
    const [x0, y0, x1, y1] = [0, 1, 2, 3].map((k) => index.slotRect[s * 4 + k] as number) as [number, number, number, number];
    if (x1 >= rect.minX && x0 <= rect.maxX && y1 >= rect.minY && y0 <= rect.maxY) n += index.slotBinCount[s] as number;
  }
  return n;
}

describe('binDetailAt', () => {
  it('merges racks when a bay is a few pixels long, shows bays, then level bands as it zooms', () => {
    expect(binDetailAt(1, 1.2, 1, 5)).toBe('runs');
    expect(binDetailAt(6, 1.2, 1, 5)).toBe('slots');
    expect(binDetailAt(20, 1.2, 1, 5)).toBe('levels');
    // One level per bay: nothing to band.
    expect(binDetailAt(200, 1.2, 1, 1)).toBe('slots');
  });
});

describe('drawStaticScene', () => {
  const fit = fitViewport(index.bounds!, 1280, 800, true, 40);

  it('draws all 20,000 bins at fit and only the ones in view when zoomed in', () => {
    const whole = drawStaticScene(context(), geometry, LIGHT_PALETTE, fit, 1280, 800, 5);
    expect(whole.detail).toBe('slots');
    expect(whole.binsDrawn).toBe(20_000);
    const close = zoomAt(fit, 8, 640, 400);
    const part = drawStaticScene(context(), geometry, LIGHT_PALETTE, close, 1280, 800, 5);
    expect(part.detail).toBe('levels');
    // The scene culls with a 24 px margin round the screen.
    expect(part.binsDrawn).toBe(binsInView(visibleWorldRect(close, 1280, 800, 24)));
    expect(part.binsDrawn).toBeLessThan(2_000);
  });

  it('draws a closure as a hatch with a dashed outline and a CLOSED label, not as a colour alone', () => {
    const ctx = context();
    const close = zoomAt(fit, 4, 640, 400);
    const g = { ...geometry, closures: [{ kind: 'aisle' as const, code: 'T', from: 10, to: 60 }] };
    drawStaticScene(ctx, g, LIGHT_PALETTE, close, 1280, 800, 5);
    const calls = (ctx as unknown as { __getEvents: () => { type: string; props: Record<string, unknown> }[] }).__getEvents();
    expect(calls.some((c) => c.type === 'fillText' && c.props.text === 'CLOSED')).toBe(true);
    // The closure's own outline dash (aisle centre lines use 6,6).
    expect(calls.some((c) => c.type === 'setLineDash' && (c.props.segments as number[]).join(',') === '5,3')).toBe(true);
    expect(calls.some((c) => c.type === 'clip')).toBe(true);
  });
});

describe('drawOverlayScene', () => {
  it('numbers every stop and draws the walked part dashed', () => {
    const route = routeThrough(
      [
        [0, -2],
        [0, 20],
        [5, 20],
        [5, -2],
      ],
      [
        [0, 20],
        [5, 20],
      ],
      { walkedToStop: 1, currentStop: 2 },
    );
    const { walked, remaining } = splitRoute(route);
    const ctx = context();
    const vp = fitViewport({ minX: -5, minY: -5, maxX: 10, maxY: 25 }, 400, 300, true);
    drawOverlayScene(
      ctx,
      {
        plan,
        compact: false,
        topInset: 0,
        route,
        walked,
        remaining,
        stopStates: route.stops.map((s) => stopState(s.n, route)),
        stopLabels: 'all',
        index,
        highlighted: [],
        focused: -1,
        hovered: -1,
      },
      LIGHT_PALETTE,
      vp,
      400,
      300,
    );
    const calls = (ctx as unknown as { __getEvents: () => { type: string; props: Record<string, unknown> }[] }).__getEvents();
    const texts = calls.filter((c) => c.type === 'fillText').map((c) => c.props.text);
    expect(texts).toEqual(expect.arrayContaining(['1', '2', 'D']));
    const dashes = calls.filter((c) => c.type === 'setLineDash').map((c) => (c.props.segments as number[]).join(','));
    expect(dashes).toContain('7,6');
  });
});

describe('aisle codes and the depot marker', () => {
  it('leaves out an aisle code the depot square would cover; that aisle keeps its code at the other end', () => {
    // Few, wide-apart aisles so every code is drawn at both ends; the depot sits on the front cross aisle.
    const generated = generateRectangularPlan({ aisles: 8, aisleLengthM: 30, aisleSpacingM: 3.2, baysPerAisle: 20, levels: 2, crossAisles: { middle: 0 } });
    // The depot just in front of aisle F, as the demo hall has it (between its aisles, on the front cross aisle).
    const small = { ...generated, depots: [{ code: 'D1', x: generated.aisles[5]!.x, y: -1 }] };
    const smallIndex = buildPlanIndex(small, { aisleHalfWidth: 1, rackDepth: 1, crossAisleHalfWidth: 1 });
    const g: SceneGeometry = { plan: small, index: smallIndex, closures: [], aisleHalfWidth: 1, crossAisleHalfWidth: 1, rackDepth: 1, compact: false };
    const vp = fitViewport(smallIndex.bounds!, 1000, 600, true, 40);
    const ctx = context();
    drawStaticScene(ctx, g, LIGHT_PALETTE, vp, 1000, 600, 5);
    const calls = (ctx as unknown as { __getEvents: () => { type: string; props: Record<string, unknown> }[] }).__getEvents();
    const codes = new Set(small.aisles.map((a) => a.code));
    const drawn = calls.filter((c) => c.type === 'fillText' && codes.has(c.props.text as string));
    const depot = small.depots[0]!;
    const dx = vp.ox + depot.x * vp.scale;
    const dy = vp.oy + (vp.flipY ? -depot.y : depot.y) * vp.scale;
    // The marker is a square of half-side 11 px; a 12 px code centred inside that box (plus its own half size) would touch it.
    const covered = drawn.filter((c) => Math.abs((c.props.x as number) - dx) < 11 + 6 && Math.abs((c.props.y as number) - dy) < 11 + 6);
    expect(covered).toEqual([]);
    // Every aisle still has its code somewhere; only the one under the depot lost its front end.
    for (const code of codes) expect(drawn.filter((c) => c.props.text === code).length).toBe(code === 'F' ? 1 : 2);
  });
});
