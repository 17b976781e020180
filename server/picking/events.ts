/**
 * Change signal per site: the picking service calls `siteChanged` after each commit and the live
 * board's event streams recompute one snapshot per site. A burst of changes on one instance becomes one
 * publish after DEBOUNCE_MS; the publish goes through the event hub (server/events/hub.ts), so on
 * PostgreSQL streams on every instance hear it.
 */
import { eventHub } from '../events/hub';

type Listener = () => void;

const pending = new Map<number, ReturnType<typeof setTimeout>>();
const localCounts = new Map<number, number>();
/** A burst of confirmations (a queue flushing after a Wi-Fi drop) becomes one board update. */
export const DEBOUNCE_MS = 250;

const topic = (siteId: number) => `site:${siteId}`;

export function onSiteChange(siteId: number, listener: Listener): () => void {
  localCounts.set(siteId, (localCounts.get(siteId) ?? 0) + 1);
  const off = eventHub().subscribe(topic(siteId), () => listener());
  let done = false;
  return () => {
    if (done) return;
    done = true;
    off();
    const n = (localCounts.get(siteId) ?? 1) - 1;
    if (n <= 0) localCounts.delete(siteId);
    else localCounts.set(siteId, n);
  };
}

export function siteChanged(siteId: number): void {
  // In one process nobody else can be watching; with a shared hub another instance may be.
  if ((!eventHub().shared && !localCounts.has(siteId)) || pending.has(siteId)) return;
  pending.set(
    siteId,
    setTimeout(() => {
      pending.delete(siteId);
      eventHub().publish(topic(siteId), siteId);
    }, DEBOUNCE_MS),
  );
}

export function listenerCount(siteId: number): number {
  return localCounts.get(siteId) ?? 0;
}
