/**
 * Visual harness for the floor map (not part of the app): a generated 20,000-bin plan with a trip,
 * two closures and the picker's mini map. `npx vite --port 5199`, then open
 * /tests/e2e/harness/floor-map.html — query `dark=1` for the dark palette, `aisles=N` to resize,
 * `mini=0` to hide the mini map, `stops=N&span=K` for a trip of N stops in the first K aisles.
 * `window.__floorMap` exposes the maps and timings to scripts.
 */
import '@fontsource/ibm-plex-sans/400.css';
import '@fontsource/ibm-plex-sans/600.css';
import '@fontsource/ibm-plex-sans/700.css';
import '@fontsource/ibm-plex-mono/400.css';
import { createApp, defineComponent, h, markRaw, ref } from 'vue';
import FloorMap from '../../../client/components/floor-map/FloorMap.vue';
import TripMiniMap from '../../../client/components/floor-map/TripMiniMap.vue';
import type { FloorMapApi, FloorMapRoute, MapPoint, PlanClosure, PlanGeometry, RouteStop } from '../../../client/components/floor-map/types';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { createRng } from '../../../server/core/rng';

const params = new URLSearchParams(location.search);
const aisleCount = Number(params.get('aisles') ?? 40);
const dark = params.get('dark') === '1';
const showMini = params.get('mini') !== '0';
const stopCount = Number(params.get('stops') ?? 24);
// Pick only from the first `span` aisles: a short trip shows the mini map framing the trip.
const span = Number(params.get('span') ?? aisleCount);

// 40 aisles × 50 bays × 2 sides × 5 levels = 20,000 bins; spacing fits two 1 m racks and a 3 m aisle.
const plan: PlanGeometry = markRaw(
  generateRectangularPlan({
    aisles: aisleCount,
    aisleLengthM: 72,
    aisleSpacingM: 5,
    baysPerAisle: 50,
    levels: 5,
    crossAisles: { front: true, back: true, middle: 1 },
  }),
);

/**
 * A trip drawn the S-shape way (traverse every aisle with a pick, alternating direction, then back
 * along the last aisle to the front): enough to look at, not the engine's routing.
 */
function sShapeTrip(p: PlanGeometry, stopsWanted: number, seed: number, aisles: number): FloorMapRoute {
  const rng = createRng(seed);
  const allowed = new Set(p.aisles.slice(0, aisles).map((a) => a.code));
  const pool = p.bins.filter((b) => allowed.has(b.aisle));
  const depot = p.depots[0] ?? { code: 'D1', x: 0, y: -2 };
  const length = Math.max(...p.aisles.map((a) => a.yEnd));
  const picks = new Map<string, { aisle: string; x: number; y: number; bins: string[] }>();
  const ax = new Map(p.aisles.map((a) => [a.code, a.x]));
  while (picks.size < stopsWanted) {
    const bin = pool[rng.int(pool.length)];
    if (!bin) break;
    const key = `${bin.aisle}@${bin.y.toFixed(2)}`;
    const at = picks.get(key) ?? { aisle: bin.aisle, x: ax.get(bin.aisle) ?? 0, y: bin.y, bins: [] };
    at.bins.push(bin.code);
    picks.set(key, at);
  }
  const byAisle = [...picks.values()].sort((a, b) => a.x - b.x || a.y - b.y);
  const visited = [...new Set(byAisle.map((s) => s.x))];
  const points: MapPoint[] = [
    { x: depot.x, y: depot.y },
    { x: depot.x, y: 0 },
  ];
  const stops: RouteStop[] = [];
  let end = 0;
  for (const x of visited) {
    points.push({ x, y: end });
    const here = byAisle.filter((s) => s.x === x);
    if (end !== 0) here.reverse();
    for (const s of here) {
      stops.push({ n: stops.length + 1, x, y: s.y, bins: s.bins, pointIndex: points.length });
      points.push({ x, y: s.y });
    }
    end = end === 0 ? length : 0;
    points.push({ x, y: end });
  }
  if (end !== 0) points.push({ x: visited[visited.length - 1] ?? 0, y: 0 });
  points.push({ x: depot.x, y: 0 }, { x: depot.x, y: depot.y });
  const done = Math.floor(stops.length / 3);
  return { points, stops, walkedToStop: done, currentStop: done + 1 };
}

const route = markRaw(sShapeTrip(plan, stopCount, 7, span));
const closures: PlanClosure[] = markRaw([
  { kind: 'aisle', code: plan.aisles[5]?.code ?? 'F', from: 40, to: 60 },
  { kind: 'cross_aisle', code: 'middle-1', from: 60, to: 80 },
]);

interface HarnessWindow {
  __floorMap?: {
    ready: boolean;
    mountMs: number;
    bins: number;
    map: FloorMapApi | null;
    mini: { stats: () => unknown } | null;
    selected: string[];
    route: FloorMapRoute;
  };
}
const w = window as unknown as HarnessWindow;
const selected: string[] = [];

const Harness = defineComponent({
  setup() {
    const map = ref<FloorMapApi | null>(null);
    const mini = ref<{ stats: () => unknown } | null>(null);
    const last = ref('—');
    return () =>
      h('div', { style: 'position:relative;width:100vw;height:100vh' }, [
        h(FloorMap, {
          ref: (el: unknown) => {
            map.value = el as FloorMapApi | null;
            if (w.__floorMap) w.__floorMap.map = map.value;
          },
          plan,
          closures,
          route,
          dark,
          label: 'Generated plan, 20,000 bins',
          'onBin-select': (e: { bin: { code: string } }) => {
            last.value = e.bin.code;
            selected.push(e.bin.code);
          },
        }),
        h(
          'div',
          {
            'data-testid': 'status',
            style: `position:absolute;left:8px;bottom:8px;padding:6px 10px;font-size:14px;border-radius:6px;${dark ? 'background:#1b2530;color:#e8edf2' : 'background:#fff;color:#1f2933'};border:1px solid #52606d`,
          },
          `${plan.bins.length.toLocaleString('en')} bins · ${plan.aisles.length} aisles · selected: ${last.value}`,
        ),
        showMini
          ? h('div', { style: 'position:absolute;right:12px;bottom:12px;border:2px solid #52606d;border-radius:8px;overflow:hidden' }, [
              h(TripMiniMap, {
                ref: (el: unknown) => {
                  mini.value = el as { stats: () => unknown } | null;
                  if (w.__floorMap) w.__floorMap.mini = mini.value;
                },
                plan,
                route,
                closures,
                dark,
                width: 360,
                height: 240,
              }),
            ])
          : null,
      ]);
  },
});

w.__floorMap = { ready: false, mountMs: 0, bins: plan.bins.length, map: null, mini: null, selected, route };
const t0 = performance.now();
createApp(Harness).mount('#app');
// Two frames: the first draw happens in the frame after mount.
requestAnimationFrame(() =>
  requestAnimationFrame(() => {
    if (!w.__floorMap) return;
    w.__floorMap.mountMs = performance.now() - t0;
    w.__floorMap.ready = true;
  }),
);
