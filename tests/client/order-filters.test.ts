// @vitest-environment node
/** The due/priority filters the order list and the wave builder share. */
import { describe, expect, it } from 'vitest';
import { dueFilterQuery, PRIORITY_OPTIONS } from '@client/views/orders/filters';

describe('dueFilterQuery', () => {
  it('sends only the filters that are set, the due time as an ISO instant', () => {
    expect(dueFilterQuery({ dueBefore: null, priorityAtMost: null })).toEqual({});
    expect(dueFilterQuery({ dueBefore: Date.UTC(2026, 11, 5, 14, 30), priorityAtMost: 2 })).toEqual({
      dueBefore: '2026-12-05T14:30:00.000Z',
      priorityAtMost: 2,
    });
  });

  it('offers priorities 1 to 3, each meaning "this or more urgent"', () => {
    expect(PRIORITY_OPTIONS.map((o) => o.value)).toEqual([1, 2, 3]);
    expect(PRIORITY_OPTIONS[0]!.label).toBe('P1 or more urgent');
  });
});
