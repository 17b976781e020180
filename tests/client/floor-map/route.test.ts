// @vitest-environment node
import { describe, expect, it } from 'vitest';
import { splitRoute, stopPointIndices, stopState } from '../../../client/components/floor-map/route';
import type { FloorMapRoute } from '../../../client/components/floor-map/types';
import { routeThrough } from '../../helpers/map-route';

// Depot (0,-2) → up aisle at x=5 past stops 1 and 2 → back down aisle x=10 past stop 3 → depot.
const route: FloorMapRoute = routeThrough(
  [
    [0, -2],
    [0, 0],
    [5, 0],
    [5, 10],
    [5, 30],
    [5, 40],
    [10, 40],
    [10, 20],
    [10, 0],
    [0, 0],
    [0, -2],
  ],
  [
    [5, 10],
    [5, 30],
    [10, 20],
  ],
);

describe('stopPointIndices', () => {
  it('finds each stop at its nearest point in walking order', () => {
    expect(Array.from(stopPointIndices(route.points, route.stops))).toEqual([3, 4, 7]);
  });

  it('uses a given pointIndex and resolves a place visited twice by walking order', () => {
    // Stop 2 is at the depot-side corner (0,0) that the walk passes at index 1 and again at 9.
    const stops = [
      { n: 1, x: 5, y: 10, pointIndex: 3 },
      { n: 2, x: 0, y: 0 },
    ];
    expect(Array.from(stopPointIndices(route.points, stops))).toEqual([3, 9]);
  });

  it('gives -1 for every stop of an empty polyline', () => {
    expect(Array.from(stopPointIndices([], route.stops))).toEqual([-1, -1, -1]);
  });
});

describe('splitRoute', () => {
  it('walked ends at stop k and remaining starts there, sharing that point', () => {
    const { walked, remaining } = splitRoute({ ...route, walkedToStop: 2 });
    expect(walked).toEqual(route.points.slice(0, 5));
    expect(remaining).toEqual(route.points.slice(4));
    expect(walked.length + remaining.length - 1).toBe(route.points.length);
  });

  it('nothing walked before the first stop is done', () => {
    for (const k of [null, 0, undefined]) {
      const { walked, remaining } = splitRoute({ ...route, walkedToStop: k });
      expect(walked).toEqual([]);
      expect(remaining).toEqual(route.points);
    }
  });

  it('after the last stop only the way back to the depot remains', () => {
    const { remaining } = splitRoute({ ...route, walkedToStop: 3 });
    expect(remaining).toEqual(route.points.slice(7));
  });
});

describe('stopState', () => {
  it('marks done, current and to-do stops', () => {
    const r = { ...route, walkedToStop: 1, currentStop: 2 };
    expect([1, 2, 3].map((n) => stopState(n, r))).toEqual(['done', 'current', 'todo']);
  });
});
