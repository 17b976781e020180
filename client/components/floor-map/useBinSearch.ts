import { ref } from 'vue';
import type { PlanIndex } from './plan-index';

/** The bin with this code (trimmed; codes are usually upper case, a hurried lower-case search still lands), or undefined. */
export function findBin(index: PlanIndex, code: string): number | undefined {
  const wanted = code.trim();
  return index.byCode.get(wanted) ?? index.byCode.get(wanted.toUpperCase());
}

/** The map's search box: what is typed, and the code last searched for that is not on the plan. */
export function useBinSearch(focusBin: (code: string) => boolean) {
  const query = ref('');
  const miss = ref('');
  function submit(): void {
    const q = query.value.trim();
    if (!q) return;
    miss.value = focusBin(q) ? '' : q;
  }
  return { query, miss, submit };
}
