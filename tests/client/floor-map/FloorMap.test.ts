import { flushPromises, mount } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import VueKonva from 'vue-konva';
import FloorMap from '../../../client/components/floor-map/FloorMap.vue';
import TripMiniMap from '../../../client/components/floor-map/TripMiniMap.vue';
import { binCentre, buildPlanIndex } from '../../../client/components/floor-map/plan-index';
import type { BinSelectEvent, FloorMapApi, FloorMapRoute } from '../../../client/components/floor-map/types';
import { fitViewport, worldToScreen } from '../../../client/components/floor-map/viewport';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { routeThrough } from '../../helpers/map-route';

const plan = generateRectangularPlan({ aisles: 4, aisleLengthM: 20, aisleSpacingM: 5, baysPerAisle: 8, levels: 2 });
const route: FloorMapRoute = routeThrough(
  [
    [0, -2],
    [0, 0],
    [5, 0],
    [5, 8],
    [5, 0],
    [0, 0],
    [0, -2],
  ],
  [{ n: 1, x: 5, y: 8, bins: ['B-04-01-1'] }],
  { walkedToStop: 0, currentStop: 1 },
);

const wrappers: { unmount: () => void }[] = [];
afterEach(() => {
  while (wrappers.length) wrappers.pop()?.unmount();
});

function pointer(type: string, x: number, y: number): PointerEvent {
  return new PointerEvent(type, { pointerId: 1, pointerType: 'mouse', clientX: x, clientY: y, buttons: type === 'pointerup' ? 0 : 1, bubbles: true });
}

describe('FloorMap', () => {
  it('mounts Konva canvases, finds a bin by search and reports it, and says when a code is unknown', async () => {
    const w = mount(FloorMap, { props: { plan, route, width: 400, height: 300 }, attachTo: document.body });
    wrappers.push(w);
    await flushPromises();
    expect(w.findAll('canvas').length).toBeGreaterThanOrEqual(2);

    await w.find('input[type="search"]').setValue('c-03-02-2');
    await w.find('form').trigger('submit');
    const events = w.emitted('bin-select') as [BinSelectEvent][];
    expect(events).toHaveLength(1);
    expect(events[0]![0].bin.code).toBe('C-03-02-2');
    expect(events[0]![0].via).toBe('search');
    expect(events[0]![0].levelsHere).toBe(2);
    expect(w.find('[role="tooltip"]').text()).toContain('C-03-02-2');
    expect(w.find('[role="tooltip"]').text()).toContain('Bay');

    await w.find('input[type="search"]').setValue('NOPE-1');
    await w.find('form').trigger('submit');
    expect(w.find('[role="status"]').text()).toContain('NOPE-1');
    expect(w.emitted('bin-select')).toHaveLength(1);
  });

  it('emits bin-select for a tap on a bin, and nothing for a drag', async () => {
    const w = mount(FloorMap, { props: { plan, width: 400, height: 300 }, attachTo: document.body });
    wrappers.push(w);
    await flushPromises();
    // Same fit the map makes on mount: whole plan, 40 px padding, front at the bottom, framed below the
    // 52 px band the search box and buttons take (so they never hide the first aisles).
    const index = buildPlanIndex(plan, { aisleHalfWidth: 1.5, rackDepth: 1, crossAisleHalfWidth: 1.5 });
    const fitted = fitViewport(index.bounds!, 400, 300 - 52, true, 40);
    const vp = { ...fitted, oy: fitted.oy + 52 };
    // The plan's back edge is drawn below the tools band.
    expect(worldToScreen(vp, index.bounds!.minX, index.bounds!.maxY).y).toBeGreaterThanOrEqual(52);
    const target = index.byCode.get('D-05-01-2')!;
    const c = binCentre(index, target);
    const s = worldToScreen(vp, c.x, c.y);
    const el = w.find('.floor-map__canvas').element;
    el.dispatchEvent(pointer('pointerdown', s.x, s.y));
    el.dispatchEvent(pointer('pointerup', s.x, s.y));
    await flushPromises();
    const events = w.emitted('bin-select') as [BinSelectEvent][];
    expect(events?.[0]?.[0].bin.code).toBe('D-05-01-2');

    el.dispatchEvent(pointer('pointerdown', s.x, s.y));
    el.dispatchEvent(pointer('pointermove', s.x + 40, s.y + 10));
    el.dispatchEvent(pointer('pointerup', s.x + 40, s.y + 10));
    await flushPromises();
    expect(w.emitted('bin-select')).toHaveLength(1);
  });

  it('also works when the shell installs vue-konva globally', async () => {
    const w = mount(FloorMap, { props: { plan, width: 400, height: 300 }, global: { plugins: [VueKonva] }, attachTo: document.body });
    wrappers.push(w);
    await flushPromises();
    expect(w.findAll('canvas').length).toBeGreaterThanOrEqual(2);
    expect((w.vm as unknown as FloorMapApi).focusBin('B-02-01-1')).toBe(true);
  });

  it('exposes fit, focusBin and drawing stats through its ref', async () => {
    const w = mount(FloorMap, { props: { plan, width: 400, height: 300 }, attachTo: document.body });
    wrappers.push(w);
    await flushPromises();
    const api = w.vm as unknown as FloorMapApi;
    expect(api.focusBin('A-01-01-1')).toBe(true);
    expect(api.focusBin('missing')).toBe(false);
    expect(api.stats().bins).toBe(plan.bins.length);
  });
});

describe('TripMiniMap', () => {
  it('is a picture by default: no search, no buttons, taps select nothing, and it names the current stop', async () => {
    const w = mount(TripMiniMap, { props: { plan, route, width: 300, height: 200 }, attachTo: document.body });
    wrappers.push(w);
    await flushPromises();
    expect(w.find('input').exists()).toBe(false);
    expect(w.find('button').exists()).toBe(false);
    expect(w.find('[role="img"]').attributes('aria-label')).toBe('Trip map: stop 1 of 1');
    const el = w.find('.floor-map__canvas').element;
    el.dispatchEvent(pointer('pointerdown', 150, 100));
    el.dispatchEvent(pointer('pointerup', 150, 100));
    expect(w.emitted('bin-select')).toBeUndefined();
  });
});
