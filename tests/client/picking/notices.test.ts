/** The tablet's notice line: every refusal the server sends for a queued write reads as words a picker can act on. */
import { describe, expect, it } from 'vitest';
import type { PickTrip } from '@shared/picking';
import { ApiError } from '@client/api/http';
import { formatClock, setDisplayTimeZone } from '@client/utils/format';
import { refusalNotice, routeChangeNotice, routeNotice } from '@client/views/picking/notices';
import { pickLine, pickStop, pickTrip } from '../../helpers/pick-trip';

describe('refusalNotice', () => {
  it('says a too-early second tap confirmed only the line that was seen, as information', () => {
    expect(refusalNotice(new ApiError('line_not_shown', 'x', 409))).toEqual({
      tone: 'info',
      text: 'A second tap came too soon: only the line you saw was confirmed. Check the line on screen.',
    });
  });

  it('names who did a line already and when, in the site zone, and that it counts once', () => {
    setDisplayTimeZone('UTC');
    try {
      const n = refusalNotice(new ApiError('already_confirmed', 'Already done', 409, { by: 'Robin Picker', at: '2026-12-05T14:03:00Z' }));
      expect(n.tone).toBe('info');
      // The clock as the tablet shows it everywhere (formatClock: the browser's locale, the site's zone).
      expect(formatClock('2026-12-05T14:03:00Z')).toMatch(/^(14:03|0?2:03\s?PM)$/);
      expect(n.text).toBe(`That line was already done by Robin Picker at ${formatClock('2026-12-05T14:03:00Z')}; it is counted once.`);
      expect(refusalNotice(new ApiError('already_confirmed', 'Already done', 409)).text).toBe('That line was already done by someone; it is counted once.');
    } finally {
      setDisplayTimeZone(null);
    }
  });

  it('tells the picker a reassigned trip went to someone else, whichever code says so', () => {
    for (const code of ['not_your_trip', 'trip_reassigned']) {
      expect(refusalNotice(new ApiError(code, 'Forbidden', 403))).toEqual({ tone: 'problem', text: 'Your supervisor gave this trip to another picker.' });
    }
  });

  it("keeps the server's own sentence for an undo too late and a closed trip, as a problem", () => {
    expect(refusalNotice(new ApiError('undo_expired', 'The undo time is over', 409))).toEqual({ tone: 'problem', text: 'The undo time is over.' });
    expect(refusalNotice(new ApiError('undo_not_possible', 'The trip is done', 409))).toEqual({ tone: 'problem', text: 'The trip is done.' });
    expect(refusalNotice(new ApiError('trip_closed', 'Trip 4 was cancelled.', 409))).toEqual({ tone: 'problem', text: 'Trip 4 was cancelled.' });
  });

  it('says "Not saved" with the message for any other refusal', () => {
    expect(refusalNotice(new ApiError('validation_failed', 'Quantity found is too big', 400))).toEqual({
      tone: 'problem',
      text: 'Not saved: Quantity found is too big',
    });
  });
});

function trip(cut: number[], routeChangedAt: string | null, id = 9): PickTrip {
  const stopList = [1, 2, 3].map((n) => pickStop(n, n, [pickLine(n, `A-0${n}`, { description: 'Hinge' })], { cutOff: cut.includes(n) }));
  return pickTrip(stopList, { id, routeChangedAt });
}

describe('routeNotice', () => {
  it('names the stops a closure cut off, one or several, and how to report them', () => {
    expect(routeNotice(trip([2], 'x')).text).toContain('Stop 2 cannot be reached now: report it short as "Cannot reach"');
    expect(routeNotice(trip([2, 3], 'x')).text).toContain('Stops 2, 3 cannot be reached now: report them short');
    expect(routeNotice(trip([2], 'x')).tone).toBe('problem');
  });

  it('says only that the route changed when no stop is cut off', () => {
    expect(routeNotice(trip([], 'x'))).toEqual({
      tone: 'info',
      text: 'A stretch of aisle was closed or reopened: your route has changed. Follow the new order on the stop list and map.',
    });
  });
});

describe('routeChangeNotice', () => {
  const at = '2026-12-05T10:00:00Z';
  it('stays silent for a trip whose route never changed, and for a change already seen', () => {
    expect(routeChangeNotice(trip([2], null), null)).toBeNull();
    expect(routeChangeNotice(trip([2], at), { tripId: 9, at })).toBeNull();
  });

  it('on a trip just opened, speaks only when stops are cut off', () => {
    expect(routeChangeNotice(trip([], at), null)).toBeNull();
    expect(routeChangeNotice(trip([3], at), { tripId: 8, at })?.tone).toBe('problem');
  });

  it('speaks of a change seen while the trip is open, cut off or not', () => {
    expect(routeChangeNotice(trip([], at), { tripId: 9, at: null })?.tone).toBe('info');
    expect(routeChangeNotice(trip([1], at), { tripId: 9, at: '2026-12-05T09:00:00Z' })?.text).toContain('Stop 1 cannot be reached');
  });
});
