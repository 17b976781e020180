import { describe, expect, it } from 'vitest';
import { contrast, DARK, LIGHT } from '@client/adapters/palette';

describe('contrast', () => {
  // WCAG 2.1 definition: black on white is 21:1, a colour on itself 1:1.
  it('matches the WCAG end points', () => {
    expect(contrast('#000000', '#FFFFFF')).toBeCloseTo(21, 5);
    expect(contrast('#0E5E63', '#0E5E63')).toBeCloseTo(1, 5);
  });
  // #767676 on white is the commonly cited lightest grey passing 4.5:1, at 4.54:1 (from memory).
  it('gives #767676 on white about 4.54', () => {
    expect(contrast('#767676', '#FFFFFF')).toBeCloseTo(4.54, 2);
  });
});

describe('picker palette', () => {
  // Picker screens need 7:1 (WCAG 2.1 SC 1.4.6, enhanced contrast).
  for (const [mode, p] of [
    ['light', LIGHT],
    ['dark', DARK],
  ] as const) {
    it(`holds 7:1 for text, buttons and the caution in ${mode} mode`, () => {
      expect(contrast(p.text1, p.body)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.text1, p.surface)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.text2, p.surface)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.onAction, p.action)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.cautionText, p.cautionBg)).toBeGreaterThanOrEqual(7);
    });
  }
});
