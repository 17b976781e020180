import { afterEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h, nextTick, ref } from 'vue';
import { mount } from '@vue/test-utils';
import { usePolledRun } from '@client/composables/usePolledRun';

type Run = { id: number; status: 'queued' | 'running' | 'done' | 'failed' };

/** Mounts a page that polls `answers` in turn (the last one repeats) and hands back its state. */
function mountPolling(answers: Run[], everyMs = 500) {
  const reads: number[] = [];
  const id = ref(1);
  let state!: ReturnType<typeof usePolledRun<Run>>;
  let i = 0;
  const Page = defineComponent({
    setup() {
      state = usePolledRun<Run>({
        key: () => id.value,
        read: () => {
          reads.push(id.value);
          const answer = answers[Math.min(i++, answers.length - 1)]!;
          return answer.status === 'failed' ? Promise.reject(new Error('gone')) : Promise.resolve({ ...answer, id: id.value });
        },
        everyMs,
      });
      return () => h('div');
    },
  });
  const wrapper = mount(Page);
  return { wrapper, reads, id, state: () => state };
}

async function flush(): Promise<void> {
  for (let k = 0; k < 5; k++) await Promise.resolve();
  await nextTick();
}

describe('usePolledRun', () => {
  afterEach(() => vi.useRealTimers());

  it('reads again every interval while the run is queued or running, and stops once it is done', async () => {
    vi.useFakeTimers();
    const { reads, state, wrapper } = mountPolling([
      { id: 1, status: 'queued' },
      { id: 1, status: 'running' },
      { id: 1, status: 'done' },
    ]);
    await flush();
    expect(reads).toHaveLength(1);
    expect(state().status.value).toBe('done');
    expect(state().running.value).toBe(true);
    await vi.advanceTimersByTimeAsync(499);
    expect(reads).toHaveLength(1);
    await vi.advanceTimersByTimeAsync(1);
    expect(reads).toHaveLength(2);
    await vi.advanceTimersByTimeAsync(500);
    expect(reads).toHaveLength(3);
    expect(state().running.value).toBe(false);
    await vi.advanceTimersByTimeAsync(5000);
    expect(reads).toHaveLength(3);
    wrapper.unmount();
  });

  it('stops polling when the page goes', async () => {
    vi.useFakeTimers();
    const { reads, wrapper } = mountPolling([{ id: 1, status: 'running' }]);
    await flush();
    await vi.advanceTimersByTimeAsync(1000);
    const seen = reads.length;
    expect(seen).toBeGreaterThanOrEqual(2);
    wrapper.unmount();
    await vi.advanceTimersByTimeAsync(5000);
    expect(reads).toHaveLength(seen);
  });

  it('shows a failed read as an error and stops', async () => {
    vi.useFakeTimers();
    const { reads, state, wrapper } = mountPolling([
      { id: 1, status: 'running' },
      { id: 1, status: 'failed' },
    ]);
    await flush();
    await vi.advanceTimersByTimeAsync(500);
    expect(state().status.value).toBe('error');
    expect((state().error.value as Error).message).toBe('gone');
    await vi.advanceTimersByTimeAsync(5000);
    expect(reads).toHaveLength(2);
    wrapper.unmount();
  });

  it('starts over with the new run when the key changes', async () => {
    vi.useFakeTimers();
    const { reads, id, state, wrapper } = mountPolling([{ id: 1, status: 'done' }]);
    await flush();
    expect(state().run.value?.id).toBe(1);
    id.value = 2;
    await flush();
    expect(reads).toEqual([1, 2]);
    expect(state().run.value?.id).toBe(2);
    wrapper.unmount();
  });
});
