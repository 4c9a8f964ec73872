import { describe, expect, it } from 'vitest';
import {
  accentChecks,
  accentPasses,
  accentProblem,
  contrastRatio,
  DEFAULT_ACCENT,
  labelOn,
  LABEL_INK,
  LABEL_WHITE,
  nearestPassingAccent,
  relativeLuminance,
  THEME_BACKGROUND,
} from '@/lib/embeds/contrast';

/**
 * The WCAG 2.1 relative luminance and contrast ratio (https://www.w3.org/TR/WCAG21/#dfn-contrast-ratio).
 * Published worked examples: black on white is 21:1 (the scale's maximum); #777777 on white is
 * 4.48:1 and #767676 on white 4.54:1, the well-known pair either side of the 4.5:1 line
 * (WebAIM's contrast checker gives the same). Hand-worked: #777777 has channels 119/255 = 0.4667,
 * linearised ((0.4667 + 0.055) / 1.055)^2.4 = 0.18447, so L = 0.18447 and
 * (1 + 0.05) / (0.18447 + 0.05) = 4.478.
 */
describe('contrast math (WCAG 2.1)', () => {
  it('gives the published ratios', () => {
    expect(contrastRatio('#000000', '#ffffff')).toBe(21);
    expect(contrastRatio('#ffffff', '#000000')).toBe(21);
    expect(contrastRatio('#777777', '#ffffff')).toBeCloseTo(4.478, 3);
    expect(contrastRatio('#767676', '#ffffff')).toBeCloseTo(4.542, 3);
    expect(contrastRatio('#2f6f5e', '#2f6f5e')).toBe(1);
  });

  it('computes relative luminance by the published coefficients', () => {
    expect(relativeLuminance('#ffffff')).toBe(1);
    expect(relativeLuminance('#000000')).toBe(0);
    expect(relativeLuminance('#777777')).toBeCloseTo(0.184475, 6);
    // Pure primaries are the coefficients themselves.
    expect(relativeLuminance('#ff0000')).toBeCloseTo(0.2126, 10);
    expect(relativeLuminance('#00ff00')).toBeCloseTo(0.7152, 10);
    expect(relativeLuminance('#0000ff')).toBeCloseTo(0.0722, 10);
    // Below the linear-segment threshold: 10/255 / 12.92.
    expect(relativeLuminance('#0a0a0a')).toBeCloseTo(10 / 255 / 12.92, 12);
    // Hand-worked: the default accent, channels 47/111/94.
    expect(relativeLuminance('#2f6f5e')).toBeCloseTo(0.127814, 6);
  });

  it('picks the label colour that reads best', () => {
    expect(labelOn('#2f6f5e')).toBe(LABEL_WHITE);
    expect(labelOn('#e0a526')).toBe(LABEL_INK);
    expect(labelOn('#ffffff')).toBe(LABEL_INK);
    expect(labelOn('#000000')).toBe(LABEL_WHITE);
  });
});

describe('the accent colour rule', () => {
  it('checks 3:1 against the theme background and 4.5:1 for the label on the accent', () => {
    const [onPage, label] = accentChecks('#2f6f5e', 'dark');
    expect(onPage.min).toBe(3);
    expect(label.min).toBe(4.5);
    // (0.127814 + 0.05) / (0.009821 + 0.05) = 2.972: just under 3:1 on the dark page.
    expect(onPage.ratio).toBeCloseTo(2.972, 3);
    expect(label.ratio).toBeCloseTo(5.905, 3);
  });

  it('the default accent passes on light; on dark it is a hair too dark', () => {
    expect(accentPasses(DEFAULT_ACCENT, 'light')).toBe(true);
    expect(accentPasses(DEFAULT_ACCENT, 'dark')).toBe(false);
    expect(nearestPassingAccent(DEFAULT_ACCENT, 'dark')).toBe('#2f705f');
  });

  it('a mid grey fails the label check on both themes (neither ink nor white reaches 4.5:1 on it)', () => {
    expect(contrastRatio('#777777', LABEL_WHITE)).toBeLessThan(4.5);
    expect(contrastRatio('#777777', LABEL_INK)).toBeLessThan(4.5);
    expect(accentPasses('#777777', 'light')).toBe(false);
    expect(nearestPassingAccent('#777777', 'light')).toBe('#767676');
  });

  it('proposes the nearest passing colour: same hue, smallest lightness move, and it passes', () => {
    for (const theme of ['light', 'dark'] as const) {
      for (const colour of ['#e0a526', '#f0c763', '#3a8a74', '#7fb8a6', '#777777', '#2f6f5e', '#ff0000', '#0000ff', '#ffffff', '#000000', '#151924']) {
        const suggestion = nearestPassingAccent(colour, theme);
        expect(accentPasses(suggestion, theme), `${colour} on ${theme} → ${suggestion}`).toBe(true);
        if (accentPasses(colour, theme)) expect(suggestion).toBe(colour);
      }
    }
    // Saffron on white is too light for a 3:1 button: a darker saffron.
    const saffron = nearestPassingAccent('#e0a526', 'light');
    expect(saffron).toBe('#bf8b1b');
    expect(contrastRatio(saffron, THEME_BACKGROUND.light)).toBeGreaterThanOrEqual(3);
    // One lightness step less would fail: it is the nearest.
    expect(contrastRatio('#c08c1b', THEME_BACKGROUND.light)).toBeLessThan(3);
  });

  it('words the problem and carries the suggestion', () => {
    expect(accentProblem('#2f6f5e', 'light')).toBeNull();
    const problem = accentProblem('#E0A526', 'light')!;
    expect(problem.suggestion).toBe('#bf8b1b');
    expect(problem.message).toBe('#e0a526 is hard to see on the light theme: the contrast of the button and focus ring against the light background is only 2.19:1 (3:1 needed). The nearest colour that passes is #bf8b1b.');
  });
});
