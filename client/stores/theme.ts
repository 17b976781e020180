import { computed, ref } from 'vue';
import { defineStore } from 'pinia';
import { usePreferredDark } from '@vueuse/core';

export type ThemeMode = 'light' | 'dark';
const THEME_KEY = 'aislewright.theme';

function readStored(): ThemeMode | null {
  const raw = localStorage.getItem(THEME_KEY);
  return raw === 'light' || raw === 'dark' ? raw : null;
}

export const useThemeStore = defineStore('theme', () => {
  const chosen = ref<ThemeMode | null>(readStored());
  // Until the user picks, follow the device: a tablet in a dim aisle may already be in dark mode.
  const systemDark = usePreferredDark();

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
