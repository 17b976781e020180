import { onMounted, ref } from 'vue';
import { describeError } from '@client/composables/useAsync';
import { useSessionStore } from '@client/stores/session';

/**
 * A printable page's loading: runs `load` for the current site once mounted, and keeps whether it is
 * still loading, the problem to show instead of the sheet, and when the page was printed.
 */
export function usePrintLoad(load: (siteId: number) => Promise<void>) {
  const session = useSessionStore();
  const problem = ref<string | null>(null);
  const loading = ref(true);
  const printedAt = new Date().toISOString();
  onMounted(async () => {
    const siteId = session.siteId;
    if (!siteId) return;
    try {
      await load(siteId);
    } catch (error) {
      problem.value = describeError(error);
    } finally {
      loading.value = false;
    }
  });
  return { problem, loading, printedAt };
}
