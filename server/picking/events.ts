/**
 * In-process change signal per site: the picking service calls `siteChanged` after each commit and
 * the live board's event streams recompute one snapshot per site, at most every DEBOUNCE_MS.
 */
type Listener = () => void;

const listeners = new Map<number, Set<Listener>>();
const pending = new Map<number, ReturnType<typeof setTimeout>>();
/** A burst of confirmations (a queue flushing after a Wi-Fi drop) becomes one board update. */
export const DEBOUNCE_MS = 250;

export function onSiteChange(siteId: number, listener: Listener): () => void {
  const set = listeners.get(siteId) ?? new Set<Listener>();
  set.add(listener);
  listeners.set(siteId, set);
  return () => {
    set.delete(listener);
    if (set.size === 0) listeners.delete(siteId);
  };
}

export function siteChanged(siteId: number): void {
  if (!listeners.has(siteId) || pending.has(siteId)) return;
  pending.set(
    siteId,
    setTimeout(() => {
      pending.delete(siteId);
      for (const l of listeners.get(siteId) ?? []) l();
    }, DEBOUNCE_MS),
  );
}

export function listenerCount(siteId: number): number {
  return listeners.get(siteId)?.size ?? 0;
}
