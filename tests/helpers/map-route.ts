/** Trip routes for the floor map's tests, written as the corners walked and the places stopped at. */
import type { FloorMapRoute, RouteStop } from '../../client/components/floor-map/types';

type XY = readonly [x: number, y: number];

/** The walk through `corners` (metres, in walking order) with stops 1, 2, … at `stops`; `extra` adds the rest (walked part, current stop). */
export function routeThrough(corners: readonly XY[], stops: readonly (XY | RouteStop)[], extra: Omit<FloorMapRoute, 'points' | 'stops'> = {}): FloorMapRoute {
  return {
    points: corners.map(([x, y]) => ({ x, y })),
    stops: stops.map((s, i) => ('n' in s ? s : { n: i + 1, x: s[0], y: s[1] })),
    ...extra,
  };
}
