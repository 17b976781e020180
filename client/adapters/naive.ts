import { computed, shallowRef, type Ref } from 'vue';
import { createDiscreteApi, createLocale, darkTheme, enUS, type ConfigProviderProps, type GlobalThemeOverrides } from 'naive-ui';
import { DARK, LIGHT, type Palette } from './palette';
import type { ThemeMode } from '@client/stores/theme';

const FONT = "'IBM Plex Sans', system-ui, -apple-system, 'Segoe UI', Roboto, sans-serif";
const FONT_MONO = "'IBM Plex Mono', ui-monospace, 'SFMono-Regular', Menlo, monospace";

function overrides(p: Palette): GlobalThemeOverrides {
  return {
    common: {
      fontFamily: FONT,
      fontFamilyMono: FONT_MONO,
      fontSize: '15px',
      fontSizeMedium: '15px',
      borderRadius: '6px',
      primaryColor: p.primary,
      primaryColorHover: p.primaryHover,
      primaryColorPressed: p.primaryPressed,
      primaryColorSuppl: p.primaryHover,
      warningColor: p.amber,
      warningColorHover: p.amberHover,
      warningColorPressed: p.amberPressed,
      warningColorSuppl: p.amberHover,
      successColor: p.success,
      successColorHover: p.success,
      successColorPressed: p.success,
      successColorSuppl: p.success,
      errorColor: p.error,
      errorColorHover: p.error,
      errorColorPressed: p.error,
      errorColorSuppl: p.error,
      infoColor: p.info,
      infoColorHover: p.info,
      infoColorPressed: p.info,
      infoColorSuppl: p.info,
      bodyColor: p.body,
      cardColor: p.surface,
      modalColor: p.raised,
      popoverColor: p.raised,
      tableColor: p.surface,
      textColorBase: p.text1,
      textColor1: p.text1,
      textColor2: p.text2,
      textColor3: p.text3,
      borderColor: p.border,
      dividerColor: p.divider,
    },
    // Naive's primary buttons default to white text; the dark palette's light teal needs dark text.
    Button: {
      textColorPrimary: p.onPrimary,
      textColorHoverPrimary: p.onPrimary,
      textColorPressedPrimary: p.onPrimary,
      textColorFocusPrimary: p.onPrimary,
      fontWeight: '500',
    },
    Layout: { headerColor: p.surface, siderColor: p.surface, color: p.body },
    Menu: {
      itemTextColorActive: p.primary,
      itemTextColorActiveHover: p.primary,
      itemColorActive: p.selected,
      itemColorActiveHover: p.selected,
    },
  };
}

// Our own words in place of the library's generic ones ("Please Input", "No Data").
const locale = createLocale(
  {
    Input: { placeholder: '' },
    InputNumber: { placeholder: '' },
    Select: { placeholder: 'Choose…' },
    Empty: { description: 'Nothing here yet' },
  },
  enUS,
);

export function configFor(mode: ThemeMode): ConfigProviderProps {
  return mode === 'dark' ? { theme: darkTheme, themeOverrides: overrides(DARK), locale } : { theme: null, themeOverrides: overrides(LIGHT), locale };
}

export function paletteFor(mode: ThemeMode): Palette {
  return mode === 'dark' ? DARK : LIGHT;
}

const discreteMode = shallowRef<ThemeMode>('light');
let discrete: ReturnType<typeof build> | null = null;

function build() {
  const props: Ref<ConfigProviderProps> = computed(() => configFor(discreteMode.value));
  return createDiscreteApi(['message', 'dialog'], { configProviderProps: props });
}

/** Keeps messages and dialogs shown outside components in the same theme as the app. */
export function setDiscreteTheme(mode: ThemeMode): void {
  discreteMode.value = mode;
}

/** The one message/dialog API for code outside components; created on first use. */
export function useDiscrete() {
  discrete ??= build();
  return { message: discrete.message, dialog: discrete.dialog };
}
