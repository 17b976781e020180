/**
 * What the tablet shows: the server's trip with the writes still queued on the device applied on
 * top, so a picker working through a Wi-Fi drop sees each confirmation at once. Pure, for tests.
 */
import type { LineAnswer, PickStop, PickTrip } from '@shared/picking';
import type { PickLineView } from '@shared/waves';
import type { QueuedAction } from './offline-queue';

export function applyPending(trip: PickTrip, pending: readonly QueuedAction[]): PickTrip {
  const mine = pending.filter((p) => p.action.tripId === trip.id);
  if (mine.length === 0) return trip;
  let stops: PickStop[] = trip.stopList.map((s) => ({ ...s, lines: s.lines.map((l) => ({ ...l })) }));
  for (const { action } of mine) {
    if (action.kind === 'confirm' || action.kind === 'short') {
      for (const s of stops) {
        const line = s.lines.find((l) => l.id === action.lineId);
        if (!line || line.status !== 'open') continue;
        if (action.kind === 'confirm') Object.assign(line, { status: 'picked', pickedQty: line.qty } satisfies Partial<PickLineView>);
        else Object.assign(line, { status: 'short', pickedQty: action.body.qtyFound, shortReason: action.body.reason } satisfies Partial<PickLineView>);
        if (s.lines.every((l) => l.status !== 'open')) s.status = 'done';
      }
    } else if (action.kind === 'undo') {
      for (const s of stops) {
        const line = s.lines.find((l) => l.id === action.lineId);
        if (!line || line.status === 'open' || line.status === 'cancelled') continue;
        Object.assign(line, { status: 'open', pickedQty: null, shortReason: null } satisfies Partial<PickLineView>);
        s.status = 'open';
      }
    } else if (action.kind === 'skip') {
      const i = stops.findIndex((s) => s.id === action.stopId);
      if (i >= 0 && stops[i]!.status === 'open') {
        // To the end of the walk until the server re-sequences; the printed number stays.
        const moved = { ...stops[i]!, skipped: true };
        stops = [...stops.slice(0, i), ...stops.slice(i + 1), moved];
      }
    }
  }
  return { ...trip, stopList: stops, currentStopId: currentStopOf(stops) };
}

/** First stop in walking order with an open line, preferring stops a walk still reaches. */
export function currentStopOf(stops: readonly PickStop[]): number | null {
  const open = (s: PickStop) => s.status === 'open' && s.lines.some((l) => l.status === 'open');
  return (stops.find((s) => open(s) && !s.cutOff) ?? stops.find(open))?.id ?? null;
}

/** The trip after a confirmation or short answered by the server (the line, its stop, the revision). */
export function mergeLineAnswer(trip: PickTrip, a: LineAnswer): PickTrip {
  if (a.tripId !== trip.id) return trip;
  const stopList = trip.stopList.map((s) =>
    s.id !== a.stop.id ? s : { ...s, status: a.stop.status, lines: s.lines.map((l) => (l.id === a.line.id ? a.line : l)) },
  );
  return { ...trip, stopList, status: a.tripStatus, revision: Math.max(trip.revision, a.revision), currentStopId: currentStopOf(stopList) };
}

/**
 * Whether a trip read from the server may replace the one the tablet holds. A read that left the
 * server before a confirmation's answer arrived carries a lower revision; taking it would reopen
 * lines already confirmed (and already gone from the queue), so the picker's next scan would fail.
 */
export function supersedes(incoming: Pick<PickTrip, 'id' | 'revision'>, held: Pick<PickTrip, 'id' | 'revision'> | null): boolean {
  return !held || incoming.id !== held.id || incoming.revision >= held.revision;
}

export interface TripProgress {
  stopsDone: number;
  linesDone: number;
  lines: number;
  shorts: number;
}

export function progressOf(trip: PickTrip): TripProgress {
  const lines = trip.stopList.flatMap((s) => s.lines);
  return {
    stopsDone: trip.stopList.filter((s) => s.status === 'done').length,
    linesDone: lines.filter((l) => l.status !== 'open').length,
    lines: lines.length,
    shorts: lines.filter((l) => l.status === 'short').length,
  };
}

/** What the scanner must read for a line, by the site's setting. */
export const expectedScan = (line: Pick<PickLineView, 'bin' | 'sku'>, mode: 'bin' | 'sku'): string => (mode === 'bin' ? line.bin : line.sku);

/** Scanners differ in case and padding, never in the code itself (the server compares the same way). */
export const scanMatches = (scanned: string, expected: string): boolean => scanned.trim().toUpperCase() === expected.trim().toUpperCase();
