import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { flushPromises, mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { createMemoryHistory, RouterView } from 'vue-router';
import { NDialogProvider, NMessageProvider } from 'naive-ui';
import { createAppRouter, handleSessionExpired, installGuards } from '@client/router';
import { useSessionStore } from '@client/stores/session';

const admin = {
  id: 1,
  name: 'Avery Admin',
  email: 'admin@example.test',
  role: 'admin',
  badge: null,
  sites: [{ id: 1, code: 'S1', name: 'Site one' }],
  sessionEndsAt: '2026-01-01T10:00:00Z',
};

type Reply = { status: number; body: unknown };
const json = ({ status, body }: Reply) => new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } });
const unauthenticated: Reply = { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in first.' } } };

/** A fetch that answers by "METHOD path"; anything unplanned is a 404 so a stray call shows up. */
function fakeServer(replies: Record<string, Reply>) {
  return vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
    const key = `${init?.method ?? 'GET'} ${String(input)}`;
    return json(replies[key] ?? { status: 404, body: { error: { code: 'not_found', message: key } } });
  });
}

const Root = defineComponent({
  render: () => h(NMessageProvider, null, { default: () => h(NDialogProvider, null, { default: () => h(RouterView) }) }),
});

async function boot(path: string) {
  const pinia = createPinia();
  setActivePinia(pinia);
  const router = createAppRouter(createMemoryHistory());
  const session = useSessionStore();
  installGuards(router, session);
  await router.push(path);
  await router.isReady();
  const wrapper = mount(Root, { global: { plugins: [pinia, router] }, attachTo: document.body });
  await flushPromises();
  return { router, session, wrapper };
}

beforeEach(() => localStorage.clear());
afterEach(() => {
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

describe('SignInView', () => {
  it('is where a visitor lands, remembering the page asked for, with a clear way to picker sign-in', async () => {
    vi.stubGlobal('fetch', fakeServer({ 'GET /api/auth/me': unauthenticated }));
    const { router, wrapper } = await boot('/admin/outbox');
    expect(router.currentRoute.value.path).toBe('/sign-in');
    expect(router.currentRoute.value.query.next).toBe('/admin/outbox');
    expect(wrapper.find('#sign-in-email').exists()).toBe(true);
    expect(wrapper.find('#sign-in-password').exists()).toBe(true);
    const picker = wrapper.findAll('a').find((a) => a.text().includes('Picker sign-in'));
    expect(picker?.attributes('href')).toBe('/sign-in/badge?next=/admin/outbox');
  });

  it('names the empty fields without calling the server', async () => {
    const fetch = fakeServer({ 'GET /api/auth/me': unauthenticated });
    vi.stubGlobal('fetch', fetch);
    const { wrapper } = await boot('/sign-in');
    await wrapper.find('form').trigger('submit');
    await flushPromises();
    expect(wrapper.text()).toContain('Invalid email address');
    expect(fetch.mock.calls.map((c) => String(c[0]))).toEqual(['/api/auth/me']);
  });

  it('signs in with the CSRF header and goes back to the page asked for', async () => {
    const fetch = fakeServer({ 'GET /api/auth/me': unauthenticated, 'POST /api/auth/sign-in': { status: 200, body: admin } });
    vi.stubGlobal('fetch', fetch);
    const { router, wrapper } = await boot('/sign-in?next=%2Fadmin%2Foutbox');
    await wrapper.find('#sign-in-email').setValue('Admin@Example.test');
    await wrapper.find('#sign-in-password').setValue('demo-password-1');
    await wrapper.find('form').trigger('submit');
    await flushPromises();
    const call = fetch.mock.calls.find((c) => String(c[0]) === '/api/auth/sign-in');
    expect((call?.[1]?.headers as Record<string, string>)['x-aislewright']).toBe('1');
    expect(JSON.parse(String(call?.[1]?.body))).toEqual({ email: 'admin@example.test', password: 'demo-password-1' });
    // The page's code loads lazily, so the navigation settles a little after the answer.
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/admin/outbox'), { timeout: 8000 });
  });

  it('shows the server message for wrong credentials and stays on the page', async () => {
    vi.stubGlobal(
      'fetch',
      fakeServer({
        'GET /api/auth/me': unauthenticated,
        'POST /api/auth/sign-in': { status: 401, body: { error: { code: 'invalid_credentials', message: 'E-mail or password is not right.' } } },
      }),
    );
    const { router, wrapper } = await boot('/sign-in');
    await wrapper.find('#sign-in-email').setValue('admin@example.test');
    await wrapper.find('#sign-in-password').setValue('wrong-password');
    await wrapper.find('form').trigger('submit');
    await flushPromises();
    expect(wrapper.find('[role="alert"]').text()).toContain('E-mail or password is not right.');
    expect(router.currentRoute.value.path).toBe('/sign-in');
  });
});

describe('session expiry', () => {
  it('goes to sign-in with the current page as next, then back there after signing in', async () => {
    const fetch = fakeServer({ 'GET /api/auth/me': { status: 200, body: admin }, 'POST /api/auth/sign-in': { status: 200, body: admin } });
    vi.stubGlobal('fetch', fetch);
    const { router, session, wrapper } = await boot('/admin/sites');
    expect(router.currentRoute.value.path).toBe('/admin/sites');

    await handleSessionExpired(router, session);
    await flushPromises();
    expect(session.me).toBeNull();
    expect(router.currentRoute.value.path).toBe('/sign-in');
    expect(router.currentRoute.value.query.next).toBe('/admin/sites');

    await wrapper.find('#sign-in-email').setValue('admin@example.test');
    await wrapper.find('#sign-in-password').setValue('demo-password-1');
    await wrapper.find('form').trigger('submit');
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/admin/sites'), { timeout: 8000 });
  });

  it('does nothing more when already on a public page', async () => {
    vi.stubGlobal('fetch', fakeServer({ 'GET /api/auth/me': unauthenticated }));
    const { router, session } = await boot('/forgot-password');
    await expect(handleSessionExpired(router, session)).resolves.toBeNull();
    expect(router.currentRoute.value.path).toBe('/forgot-password');
  });
});
