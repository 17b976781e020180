import { computed, onMounted, ref, shallowRef, watch } from 'vue';
import { useTimeoutPoll } from '@vueuse/core';
import type { AsyncStatus } from './useAsync';

interface PolledRunOptions<T> {
  /** Which run the page shows (the route's id): a change starts over with the new one. */
  key: () => unknown;
  /** Reads the run; null when it cannot be read yet (no site chosen). */
  read: () => Promise<T> | null;
  /** How long to wait after an answer before reading a queued or running run again. */
  everyMs: number;
  /** After each good read (fetch what the results need); a throw counts as a failed read. */
  onRead?: (run: T) => void | Promise<void>;
  /** When the key changes, before the new run is read. */
  onReset?: () => void;
}

const isRunning = (run: { status: string } | null): boolean => run?.status === 'queued' || run?.status === 'running';

/**
 * A long run on the server (a study, a slotting run) read until it ends: read at mount, then again
 * `everyMs` after each answer while it is queued or running; the polling stops when the page goes.
 * `status` is `loading` only until the first answer, so a re-read does not blank the page.
 */
export function usePolledRun<T extends { status: string }>(options: PolledRunOptions<T>) {
  const run = shallowRef<T | null>(null);
  const status = ref<AsyncStatus>('idle');
  const error = shallowRef<unknown>(null);
  const running = computed(() => isRunning(run.value));
  const poll = useTimeoutPoll(load, options.everyMs, { immediate: false });

  async function load(): Promise<void> {
    const request = options.read();
    if (!request) return;
    if (!run.value) status.value = 'loading';
    try {
      const answer = await request;
      run.value = answer;
      status.value = 'done';
      await options.onRead?.(answer);
      if (isRunning(answer)) poll.resume();
      else poll.pause();
    } catch (e) {
      error.value = e;
      status.value = 'error';
      poll.pause();
    }
  }

  onMounted(load);
  watch(options.key, () => {
    run.value = null;
    options.onReset?.();
    void load();
  });

  return { run, status, error, running, load };
}
