/** One call's state on screen: `useAsync`'s retry, and the loading/error/empty card and list card that read it. */
import { describe, expect, it, vi } from 'vitest';
import { flushPromises, mount } from '@vue/test-utils';
import { ApiError } from '@client/api/http';
import { useAsync } from '@client/composables/useAsync';
import BaseAsyncState from '@client/components/BaseAsyncState.vue';
import BaseTableCard from '@client/components/BaseTableCard.vue';

const failing = () => Promise.reject(new ApiError('unavailable', 'The server is busy', 503));

describe('useAsync retry', () => {
  it('runs the call again with the last arguments, and does nothing before the first run', async () => {
    const read = vi.fn(async (site: number, page: number) => `${site}/${page}`);
    const state = useAsync(read);
    expect(await state.retry()).toBeNull();
    expect(read).not.toHaveBeenCalled();
    await state.run(4, 2);
    expect(await state.retry()).toBe('4/2');
    expect(read.mock.calls).toEqual([
      [4, 2],
      [4, 2],
    ]);
  });
});

describe('BaseAsyncState', () => {
  it("shows the source's error and, without @retry, tries the source again", async () => {
    const call = vi.fn(failing);
    const state = useAsync(call);
    await state.run();
    const w = mount(BaseAsyncState, { props: { source: state, what: 'waves' } });
    expect(w.text()).toContain('Could not load waves');
    expect(w.text()).toContain('The server is busy');
    await w.get('button').trigger('click');
    expect(call).toHaveBeenCalledTimes(2);
  });

  it('calls @retry instead when given one', async () => {
    const call = vi.fn(failing);
    const state = useAsync(call);
    await state.run();
    const onRetry = vi.fn();
    const w = mount(BaseAsyncState, { props: { source: state, what: 'waves', onRetry } });
    await w.get('button').trigger('click');
    expect(onRetry).toHaveBeenCalledTimes(1);
    expect(call).toHaveBeenCalledTimes(1);
  });

  it('takes status and error given apart', () => {
    expect(mount(BaseAsyncState, { props: { status: 'loading', what: 'sites' } }).text()).toContain('Loading sites…');
    expect(mount(BaseAsyncState, { props: { status: 'error', error: new Error('Gone'), what: 'sites' } }).text()).toContain('Gone');
  });
});

describe('BaseTableCard', () => {
  const columns = [{ title: 'Name', key: 'name' }];

  it("lists the source's rows, or the rows given, and says the empty text when there are none", async () => {
    const state = useAsync(async () => [
      { id: 1, name: 'North' },
      { id: 2, name: 'South' },
    ]);
    await state.run();
    const all = mount(BaseTableCard, { props: { source: state, columns, what: 'sites', emptyText: 'No sites yet.' } });
    await flushPromises();
    expect(all.findAll('tbody tr').map((r) => r.text())).toEqual(['North', 'South']);
    const some = mount(BaseTableCard, { props: { source: state, rows: [state.data.value![1]!], columns, what: 'sites', emptyText: 'No sites yet.' } });
    expect(some.findAll('tbody tr').map((r) => r.text())).toEqual(['South']);
    const none = mount(BaseTableCard, { props: { source: state, rows: [], columns, what: 'sites', emptyText: 'No sites yet.' } });
    expect(none.text()).toContain('No sites yet.');
  });
});
