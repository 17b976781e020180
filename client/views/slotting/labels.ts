import type { SlottingRunSummary } from '@shared/slotting';

type Status = SlottingRunSummary['status'];
export const RUN_STATUS_LABEL: Record<Status, string> = { queued: 'Queued', running: 'Running', done: 'Done', failed: 'Failed', cancelled: 'Cancelled' };
/** Tag colours always come with the word, never alone. */
export const RUN_STATUS_TYPE: Record<Status, 'default' | 'info' | 'success' | 'error' | 'warning'> = {
  queued: 'default',
  running: 'info',
  done: 'success',
  failed: 'error',
  cancelled: 'warning',
};

/**
 * Picks per bin scaled to 0…1 by the busiest bin of either map, so "now" and "after" compare on one
 * scale; square root, so the long tail of a 20/80 history still shows.
 */
export function heatScale(
  before: Record<string, number>,
  after: Record<string, number>,
): { before: Record<string, number>; after: Record<string, number>; max: number } {
  const max = Math.max(1, ...Object.values(before), ...Object.values(after));
  const scale = (m: Record<string, number>) => Object.fromEntries(Object.entries(m).map(([k, v]) => [k, Math.sqrt(v / max)]));
  return { before: scale(before), after: scale(after), max };
}
