import { computed, ref } from 'vue';
import { defineStore } from 'pinia';

export type ThemeMode = 'light' | 'dark';
const THEME_KEY = 'aislewright.theme';

function readStored(): ThemeMode | null {
  const raw = localStorage.getItem(THEME_KEY);
  return raw === 'light' || raw === 'dark' ? raw : null;
}

export const useThemeStore = defineStore('theme', () => {
  const chosen = ref<ThemeMode | null>(readStored());
  const media = typeof window.matchMedia === 'function' ? window.matchMedia('(prefers-color-scheme: dark)') : null;
  const systemDark = ref(media?.matches ?? false);
  // Until the user picks, follow the device: a tablet in a dim aisle may already be in dark mode.
  media?.addEventListener('change', (event) => {
    systemDark.value = event.matches;
  });

  const mode = computed<ThemeMode>(() => chosen.value ?? (systemDark.value ? 'dark' : 'light'));
  const isDark = computed(() => mode.value === 'dark');

  function setMode(next: ThemeMode): void {
    chosen.value = next;
    localStorage.setItem(THEME_KEY, next);
  }

  function toggle(): void {
    setMode(isDark.value ? 'light' : 'dark');
  }

  return { mode, isDark, setMode, toggle };
});
