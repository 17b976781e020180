/** Route helpers of the floor map: where each stop lies on the polyline, walked vs remaining. */
import type { FloorMapRoute, MapPoint, RouteStop } from './types';

export type StopState = 'done' | 'current' | 'todo';

/**
 * Index in `points` of each stop (same order as `stops`): its own `pointIndex` when valid, else
 * the nearest point at or after the previous stop's index, so a route that passes a place twice
 * still splits where the stop is visited. O(points + stops); -1 for every stop when there are no points.
 */
export function stopPointIndices(points: readonly MapPoint[], stops: readonly RouteStop[]): Int32Array {
  const out = new Int32Array(stops.length).fill(-1);
  if (points.length === 0) return out;
  let from = 0;
  for (let k = 0; k < stops.length; k++) {
    const stop = stops[k] as RouteStop;
    const given = stop.pointIndex;
    if (given !== undefined && Number.isInteger(given) && given >= from && given < points.length) {
      out[k] = given;
      from = given;
      continue;
    }
    let best = from;
    let bestD = Infinity;
    for (let i = from; i < points.length; i++) {
      const p = points[i] as MapPoint;
      const d = (p.x - stop.x) ** 2 + (p.y - stop.y) ** 2;
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    }
    out[k] = best;
    from = best;
  }
  return out;
}

/**
 * Splits the polyline at stop `walkedToStop` (by stop number `n`): `walked` ends at that stop and
 * `remaining` starts there, sharing the point so the two lines join. No stop walked (null, 0 or an
 * unknown number below every stop): `walked` is empty.
 */
export function splitRoute(route: FloorMapRoute): { walked: MapPoint[]; remaining: MapPoint[] } {
  const { points, stops } = route;
  const k = route.walkedToStop ?? 0;
  if (points.length === 0) return { walked: [], remaining: [] };
  const idx = stopPointIndices(points, stops);
  let cut = -1;
  stops.forEach((s, i) => {
    if (s.n <= k) cut = Math.max(cut, idx[i] as number);
  });
  if (cut < 0) return { walked: [], remaining: points.slice() };
  return { walked: points.slice(0, cut + 1), remaining: points.slice(cut) };
}

export function stopState(n: number, route: FloorMapRoute): StopState {
  if (route.currentStop != null && n === route.currentStop) return 'current';
  if (route.walkedToStop != null && n <= route.walkedToStop) return 'done';
  return 'todo';
}

/**
 * A map route from the API's shape: the walked path as [x, y] pairs and the numbered stops, as every
 * trip, preview and tablet answer carries them (metres).
 */
export function routeFromTrip(
  path: readonly (readonly [number, number])[],
  stops: readonly { n: number; x: number; y: number; bins: string[] }[],
): FloorMapRoute {
  return { points: path.map(([x, y]) => ({ x, y })), stops: stops.map((s) => ({ n: s.n, x: s.x, y: s.y, bins: s.bins })) };
}
