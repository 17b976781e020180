import { describe, expect, it } from 'vitest';
import { BUILD_STEPS, metres, stepOf } from '../../../client/views/floor-plans/format';

describe('floor-plan view formatting', () => {
  it('writes metres with their unit, with one decimal only when there is a fraction', () => {
    expect(metres(3600)).toBe('3,600 m');
    expect(metres(12.25)).toBe('12.3 m');
  });

  it('places each job phase on its build step, and done past the last', () => {
    expect(stepOf('queued')).toBe(0);
    expect(stepOf('parsing')).toBe(1);
    expect(stepOf('building_distances')).toBe(4);
    expect(stepOf('done')).toBe(BUILD_STEPS.length + 1);
    // A generated plan skips reading and checking: the graph is its first step.
    expect(stepOf('building_graph', BUILD_STEPS.slice(2))).toBe(1);
  });
});
