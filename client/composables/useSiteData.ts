import { onMounted, watch } from 'vue';
import { useSessionStore } from '@client/stores/session';
import { useAsync, type AsyncState } from './useAsync';

/**
 * Data of the current site (`useAsync`), read at mount and again when the user switches site.
 * `load` (also its `retry`) reads again for the current site; it does nothing while no site is chosen.
 */
export function useSiteData<T>(read: (siteId: number) => Promise<T>): AsyncState<T, [number]> & { load: () => Promise<T | null> } {
  const session = useSessionStore();
  const state = useAsync(read);
  const load = (): Promise<T | null> => (session.siteId ? state.run(session.siteId) : Promise.resolve(null));
  onMounted(load);
  watch(() => session.siteId, load);
  return { ...state, load, retry: load };
}
