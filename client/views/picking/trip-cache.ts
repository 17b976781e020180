/**
 * The picker's open trip and its map, kept in IndexedDB beside the offline queue, so a reload in a
 * Wi-Fi gap (the app shell opens from the service worker) shows the same trip and lets picking go on.
 * Only this device's own copy of answers already read; the service worker itself never caches the API.
 */
import { createStore, del, get, set, type UseStore } from 'idb-keyval';
import { PickTrip, TripPlan } from '@shared/picking';
import { z } from 'zod';

const KEY = 'open-trip';
const Saved = z.object({ userId: z.number().int(), siteId: z.number().int(), trip: PickTrip, plan: TripPlan.nullable() });
export type SavedTrip = z.infer<typeof Saved>;

let store: UseStore | null = null;
const db = (): UseStore => (store ??= createStore('aislewright-trip', 'trip'));

export async function saveTrip(entry: SavedTrip): Promise<void> {
  try {
    await set(KEY, entry, db());
  } catch {
    // Private mode or a full disk: the trip still works online; only an offline reload loses it.
  }
}

export async function clearTrip(): Promise<void> {
  try {
    await del(KEY, db());
  } catch {
    // Nothing saved to clear.
  }
}

/** The saved trip when it belongs to this picker at this site (a shared tablet changes hands). */
export async function loadTrip(userId: number, siteId: number): Promise<SavedTrip | null> {
  try {
    const parsed = Saved.safeParse(await get(KEY, db()));
    if (!parsed.success || parsed.data.userId !== userId || parsed.data.siteId !== siteId) return null;
    return parsed.data;
  } catch {
    return null;
  }
}
