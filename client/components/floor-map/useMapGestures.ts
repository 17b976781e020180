import type { Ref } from 'vue';
import { hitTestBin, type PlanIndex } from './plan-index';
import type { MapPoint, MapView } from './types';
import { panBy, pinchViewport, screenToWorld, wheelFactor, zoomAt, type ScaleLimits, type Viewport } from './viewport';

/** Pixels moved before a press becomes a drag rather than a tap. */
const TAP_SLOP_PX = 6;
const PAN_STEP_PX = 80;

interface GestureInputs {
  view: MapView;
  /** The element the pointer events land on (its box gives local coordinates). */
  el: Ref<HTMLElement | null>;
  interactive: () => boolean;
  index: () => PlanIndex;
  limits: () => ScaleLimits;
  /** Moves the view; `gesture` marks a drag, pinch or wheel still going on. */
  setViewport: (next: Viewport, gesture: boolean) => void;
  zoomBy: (factor: number) => void;
  fit: () => void;
  /** A tap (or Escape, with -1) chose a bin. */
  select: (bin: number) => void;
  /** The mouse is over this bin now (-1: none). */
  hover: (bin: number) => void;
}

interface Press {
  x: number;
  y: number;
}

/** Pointer and keyboard input of the floor map: drag to pan, two pointers to pinch, wheel to zoom, tap or hover for a bin. */
export function useMapGestures(inputs: GestureInputs) {
  const presses = new Map<number, Press>();
  let dragStart: { vp: Viewport; x: number; y: number } | null = null;
  let pinchStart: { vp: Viewport; a: MapPoint; b: MapPoint; ids: [number, number] } | null = null;
  let moved = false;

  function localPoint(e: PointerEvent | WheelEvent): MapPoint {
    const r = inputs.el.value?.getBoundingClientRect();
    return { x: e.clientX - (r?.left ?? 0), y: e.clientY - (r?.top ?? 0) };
  }

  function binAt(p: MapPoint, pointerType: string): number {
    const vp = inputs.view.vp;
    const w = screenToWorld(vp, p.x, p.y);
    // Fingers are wider than a mouse pointer: forgive a few pixels off a narrow rack.
    const slopPx = pointerType === 'touch' ? 10 : 2;
    return hitTestBin(inputs.index(), w.x, w.y, slopPx / vp.scale);
  }

  function onPointerDown(e: PointerEvent): void {
    if (!inputs.interactive()) return;
    const p = localPoint(e);
    presses.set(e.pointerId, { x: p.x, y: p.y });
    try {
      // Keeps the drag alive when the pointer leaves the map; a synthetic or finished pointer throws.
      inputs.el.value?.setPointerCapture(e.pointerId);
    } catch {
      // Without capture the drag still works while the pointer stays over the map.
    }
    if (presses.size === 1) {
      dragStart = { vp: { ...inputs.view.vp }, x: p.x, y: p.y };
      moved = false;
    } else if (presses.size === 2) {
      const [[ia, a], [ib, b]] = [...presses.entries()] as [[number, Press], [number, Press]];
      pinchStart = { vp: { ...inputs.view.vp }, a: { x: a.x, y: a.y }, b: { x: b.x, y: b.y }, ids: [ia, ib] };
      dragStart = null;
      moved = true;
    }
  }

  function onPointerMove(e: PointerEvent): void {
    if (!inputs.interactive()) return;
    const p = localPoint(e);
    const press = presses.get(e.pointerId);
    if (!press) {
      if (e.pointerType === 'mouse') inputs.hover(binAt(p, e.pointerType));
      return;
    }
    press.x = p.x;
    press.y = p.y;
    if (pinchStart) {
      const a = presses.get(pinchStart.ids[0]);
      const b = presses.get(pinchStart.ids[1]);
      if (a && b) inputs.setViewport(pinchViewport(pinchStart.vp, pinchStart.a, pinchStart.b, a, b, inputs.limits()), true);
      return;
    }
    if (dragStart) {
      const dx = p.x - dragStart.x;
      const dy = p.y - dragStart.y;
      if (!moved && Math.hypot(dx, dy) < TAP_SLOP_PX) return;
      moved = true;
      inputs.setViewport(panBy(dragStart.vp, dx, dy), true);
    }
  }

  function onPointerUp(e: PointerEvent): void {
    const press = presses.get(e.pointerId);
    presses.delete(e.pointerId);
    if (!press || !inputs.interactive()) return;
    if (!moved && presses.size === 0 && e.type === 'pointerup') inputs.select(binAt({ x: press.x, y: press.y }, e.pointerType));
    if (presses.size === 1) {
      // One finger left after a pinch: carry on as a drag from where it is.
      const [rest] = [...presses.values()] as [Press];
      dragStart = { vp: { ...inputs.view.vp }, x: rest.x, y: rest.y };
      pinchStart = null;
    } else if (presses.size === 0) {
      dragStart = null;
      pinchStart = null;
    }
  }

  function onPointerLeave(): void {
    inputs.hover(-1);
  }

  function onWheel(e: WheelEvent): void {
    if (!inputs.interactive()) return;
    e.preventDefault();
    const p = localPoint(e);
    inputs.setViewport(zoomAt(inputs.view.vp, wheelFactor(e.deltaY, e.deltaMode), p.x, p.y, inputs.limits()), true);
  }

  function onKey(e: KeyboardEvent): void {
    if (!inputs.interactive()) return;
    const moves: Record<string, [number, number]> = {
      ArrowLeft: [PAN_STEP_PX, 0],
      ArrowRight: [-PAN_STEP_PX, 0],
      ArrowUp: [0, PAN_STEP_PX],
      ArrowDown: [0, -PAN_STEP_PX],
    };
    const m = moves[e.key];
    if (m) inputs.setViewport(panBy(inputs.view.vp, m[0], m[1]), false);
    else if (e.key === '+' || e.key === '=') inputs.zoomBy(1.4);
    else if (e.key === '-') inputs.zoomBy(1 / 1.4);
    else if (e.key === '0') inputs.fit();
    else if (e.key === 'Escape') inputs.select(-1);
    else return;
    e.preventDefault();
  }

  return { onPointerDown, onPointerMove, onPointerUp, onPointerLeave, onWheel, onKey };
}
