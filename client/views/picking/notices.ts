/** What the picker's tablet says in its notice line: pure, so each wording is tested without a screen. */
import type { PickTrip } from '@shared/picking';
import { formatClock } from '@client/utils/format';

/** `problem` stays until the picker taps OK; `info` clears itself at the next confirmation. */
export interface Notice {
  tone: 'info' | 'problem';
  text: string;
}

/** The part of a refused write the notice needs (an ApiError has it). */
export interface Refusal {
  code: string;
  message: string;
  details?: unknown;
}

export const REASSIGNED: Notice = { tone: 'problem', text: 'Your supervisor gave this trip to another picker.' };

/** What the picker is told when the server refused a queued write for good. */
export function refusalNotice(error: Refusal): Notice {
  switch (error.code) {
    case 'line_not_shown':
      return { tone: 'info', text: 'A second tap came too soon: only the line you saw was confirmed. Check the line on screen.' };
    case 'undo_expired':
    case 'undo_not_possible':
      return { tone: 'problem', text: `${error.message}.` };
    case 'already_confirmed': {
      const d = error.details as { by?: string | null; at?: string | null } | undefined;
      return { tone: 'info', text: `That line was already done by ${d?.by ?? 'someone'}${d?.at ? ` at ${formatClock(d.at)}` : ''}; it is counted once.` };
    }
    case 'not_your_trip':
    case 'trip_reassigned':
      return REASSIGNED;
    case 'trip_closed':
      return { tone: 'problem', text: error.message };
    default:
      return { tone: 'problem', text: `Not saved: ${error.message}` };
  }
}

const cutOffStops = (t: PickTrip): number[] => t.stopList.filter((s) => s.cutOff && s.lines.some((l) => l.status === 'open')).map((s) => s.n);

/** What the picker is told when a closure change re-routed the trip. */
export function routeNotice(t: PickTrip): Notice {
  const cut = cutOffStops(t);
  if (cut.length === 0)
    return { tone: 'info', text: 'A stretch of aisle was closed or reopened: your route has changed. Follow the new order on the stop list and map.' };
  const one = cut.length === 1;
  return {
    tone: 'problem',
    text: `A stretch of aisle was closed. ${one ? 'Stop' : 'Stops'} ${cut.join(', ')} cannot be reached now: report ${one ? 'it' : 'them'} short as "Cannot reach", or wait for your supervisor to reopen the stretch. The other stops have a new route.`,
  };
}

/**
 * The notice for a trip read from the server, given the route change seen before (null: none yet).
 * A trip just opened whose route changed earlier speaks only when stops are cut off; a route change
 * seen while the trip is open always speaks. Null: nothing new to say.
 */
export function routeChangeNotice(t: PickTrip, before: { tripId: number; at: string | null } | null): Notice | null {
  if (!t.routeChangedAt || (before && before.tripId === t.id && before.at === t.routeChangedAt)) return null;
  if (!before || before.tripId !== t.id) return cutOffStops(t).length > 0 ? routeNotice(t) : null;
  return routeNotice(t);
}
