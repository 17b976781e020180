/**
 * Aislewright's own palette: deep teal for action, warm amber for accents and cautions, neutral slate
 * for text and surfaces. One set per mode; the picker set is held to 7:1 contrast (WCAG 2.1, 1.4.6 AAA).
 */
export interface Palette {
  primary: string;
  primaryHover: string;
  primaryPressed: string;
  onPrimary: string;
  /** Picker screens' main buttons: held to 7:1 against `onAction`. */
  action: string;
  onAction: string;
  amber: string;
  amberHover: string;
  amberPressed: string;
  success: string;
  error: string;
  info: string;
  body: string;
  surface: string;
  raised: string;
  text1: string;
  text2: string;
  text3: string;
  border: string;
  divider: string;
  /** Background of the selected menu entry. */
  selected: string;
  cautionBg: string;
  cautionText: string;
  cautionBorder: string;
}

export const LIGHT: Palette = {
  primary: '#0E5E63',
  primaryHover: '#13757B',
  primaryPressed: '#0A474B',
  onPrimary: '#FFFFFF',
  action: '#0A474B',
  onAction: '#FFFFFF',
  amber: '#B45309',
  amberHover: '#C2610C',
  amberPressed: '#92400E',
  success: '#1F7A4D',
  error: '#B42318',
  info: '#475569',
  body: '#F4F6F7',
  surface: '#FFFFFF',
  raised: '#FFFFFF',
  text1: '#14202B',
  text2: '#334155',
  text3: '#55657A',
  border: '#C9D3DC',
  divider: '#E1E7EC',
  selected: '#E0EFEF',
  cautionBg: '#FFF4DB',
  cautionText: '#3D2302',
  cautionBorder: '#D08A1E',
};

export const DARK: Palette = {
  primary: '#5CC2BC',
  primaryHover: '#7DD3CE',
  primaryPressed: '#3FA59F',
  onPrimary: '#041716',
  action: '#5CC2BC',
  onAction: '#041716',
  amber: '#F3A93B',
  amberHover: '#F7BD63',
  amberPressed: '#D98E1F',
  success: '#5BC48A',
  error: '#F2877D',
  info: '#A9B7C6',
  body: '#0E1417',
  surface: '#151D21',
  raised: '#1B252A',
  text1: '#EEF3F6',
  text2: '#C8D3DB',
  text3: '#9AA9B5',
  border: '#33444D',
  divider: '#26343B',
  selected: '#1F3638',
  cautionBg: '#33260E',
  cautionText: '#FFF1D6',
  cautionBorder: '#C7861F',
};

/** Relative luminance of an sRGB colour `#RRGGBB` (WCAG 2.1 definition). */
export function luminance(hex: string): number {
  const channel = (offset: number): number => {
    const c = parseInt(hex.slice(offset, offset + 2), 16) / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5);
}

/** WCAG 2.1 contrast ratio, 1 to 21. */
export function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
}

/** CSS custom properties for our own (non-Naive) surfaces such as the picker screens. */
export function cssVars(p: Palette): Record<string, string> {
  return {
    '--aw-primary': p.primary,
    '--aw-primary-hover': p.primaryHover,
    '--aw-primary-pressed': p.primaryPressed,
    '--aw-on-primary': p.onPrimary,
    '--aw-action': p.action,
    '--aw-on-action': p.onAction,
    '--aw-amber': p.amber,
    '--aw-error': p.error,
    '--aw-success': p.success,
    '--aw-body': p.body,
    '--aw-surface': p.surface,
    '--aw-raised': p.raised,
    '--aw-text-1': p.text1,
    '--aw-text-2': p.text2,
    '--aw-text-3': p.text3,
    '--aw-border': p.border,
    '--aw-divider': p.divider,
    '--aw-caution-bg': p.cautionBg,
    '--aw-caution-text': p.cautionText,
    '--aw-caution-border': p.cautionBorder,
  };
}
