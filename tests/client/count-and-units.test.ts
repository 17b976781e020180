import { describe, expect, it } from 'vitest';
import { count, distance, distances, distanceUnit, overdueBy } from '../../client/utils/format';
import { metres, minutes } from '../../client/views/waves/format';

describe('count', () => {
  it('puts the noun in the singular for exactly one and the plural otherwise', () => {
    expect(count(1, 'trip')).toBe('1 trip');
    expect(count(0, 'trip')).toBe('0 trips');
    expect(count(3, 'trip')).toBe('3 trips');
    expect(count(1200, 'order')).toBe('1,200 orders');
    expect(count(2, 'pick list')).toBe('2 pick lists');
    expect(count(2, 'box')).toBe('2 boxes');
  });
});

describe('distances in one unit', () => {
  it('keeps a group of figures in metres while all are under 10 km', () => {
    expect(distanceUnit([447, 9_999])).toBe('m');
    expect(distances([447, 1_709])).toEqual(['447\u00a0m', '1,709\u00a0m']);
  });

  it('switches the whole group to kilometres when one figure reaches 10 km, never mixing units', () => {
    const out = distances([447, 12_300]);
    expect(out).toEqual(['0.45\u00a0km', '12.30\u00a0km']);
    expect(out.every((s) => s.endsWith('km'))).toBe(true);
    expect(distance(10_000)).toBe('10.00\u00a0km');
  });

  it('joins a figure to its unit with a non-breaking space so a table never wraps "5 min" apart', () => {
    expect(minutes(5)).toBe('5\u00a0min');
    expect(metres(244)).toBe('244\u00a0m');
    expect(minutes(125)).toBe('2\u00a0h 5\u00a0min');
  });
});

describe('overdueBy', () => {
  const now = Date.parse('2026-12-05T12:00:00Z');
  it('is null before the due time and for orders without one', () => {
    expect(overdueBy('2026-12-05T12:30:00Z', now)).toBeNull();
    expect(overdueBy(null, now)).toBeNull();
  });
  it('says how long ago the due time passed, compared as instants whatever the offset', () => {
    expect(overdueBy('2026-12-05T11:15:00Z', now)).toBe('45\u00a0min');
    // 13:00 at UTC+2 is 11:00 UTC: one hour late.
    expect(overdueBy('2026-12-05T13:00:00+02:00', now)).toBe('1\u00a0h');
    expect(overdueBy('2026-12-02T12:00:00Z', now)).toBe('3\u00a0days');
  });
});
