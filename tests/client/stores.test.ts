import { beforeEach, describe, expect, it, vi } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import { useThemeStore } from '@client/stores/theme';
import { useSessionStore } from '@client/stores/session';

function fakeMedia(dark: boolean) {
  const listeners: ((e: { matches: boolean }) => void)[] = [];
  const media = { matches: dark, addEventListener: (_: string, fn: (e: { matches: boolean }) => void) => listeners.push(fn) };
  vi.stubGlobal('matchMedia', () => media);
  return (next: boolean) => listeners.forEach((fn) => fn({ matches: next }));
}

beforeEach(() => {
  localStorage.clear();
  vi.unstubAllGlobals();
  setActivePinia(createPinia());
});

describe('useThemeStore', () => {
  it('follows the device until the user chooses, then keeps the choice', () => {
    const deviceTurns = fakeMedia(true);
    const theme = useThemeStore();
    expect(theme.mode).toBe('dark');
    deviceTurns(false);
    expect(theme.mode).toBe('light');
    theme.toggle();
    expect(theme.mode).toBe('dark');
    deviceTurns(false);
    expect(theme.mode).toBe('dark');
    expect(localStorage.getItem('aislewright.theme')).toBe('dark');
  });
  it('starts from a stored choice over the device setting', () => {
    localStorage.setItem('aislewright.theme', 'light');
    fakeMedia(true);
    expect(useThemeStore().mode).toBe('light');
  });
});

describe('useSessionStore site', () => {
  const me = (siteIds: number[]) => ({
    id: 7,
    name: 'Sam',
    email: 's@example.test',
    role: 'supervisor' as const,
    badge: null,
    sites: siteIds.map((id) => ({ id, code: `S${id}`, name: `Site ${id}` })),
    sessionEndsAt: '2026-01-01T10:00:00Z',
  });
  it('keeps the chosen site across reloads while the user still belongs to it', () => {
    const session = useSessionStore();
    session.adopt(me([1, 2]));
    expect(session.siteId).toBe(1);
    session.selectSite(2);
    expect(localStorage.getItem('aislewright.siteId')).toBe('2');

    setActivePinia(createPinia());
    const reloaded = useSessionStore();
    reloaded.adopt(me([1, 2]));
    expect(reloaded.siteId).toBe(2);
  });
  it('falls back to the first site when the stored one is no longer theirs', () => {
    localStorage.setItem('aislewright.siteId', '9');
    const session = useSessionStore();
    session.adopt(me([3, 4]));
    expect(session.siteId).toBe(3);
  });
});
