/**
 * Contrast of the publisher's accent colour on the calculator page (no I/O: the server
 * checks settings with it, the page picks the label colour with it, the studio form may
 * show it).
 *
 * Ratios use the published WCAG 2.1 formulas: relative luminance
 * L = 0.2126 R + 0.7152 G + 0.0722 B of the linearised sRGB channels
 * (https://www.w3.org/TR/WCAG21/#dfn-relative-luminance) and contrast ratio
 * (L1 + 0.05) / (L2 + 0.05), lighter over darker
 * (https://www.w3.org/TR/WCAG21/#dfn-contrast-ratio). The linearisation threshold is
 * sRGB's 0.04045 (WCAG 2.1's text prints 0.03928; no 8-bit channel lies between them).
 */

export type Theme = 'light' | 'dark';

/** The calculator page's background per theme (components/embed/CalculatorFrame.tsx: white, dusk-900). */
export const THEME_BACKGROUND: Record<Theme, string> = { light: '#ffffff', dark: '#151924' };

/** The accent a calculator starts with (the models' column default). */
export const DEFAULT_ACCENT = '#2f6f5e';

/** The two colours a label on the accent can take (the page's ink, or white). */
export const LABEL_INK = '#1d2330';
export const LABEL_WHITE = '#ffffff';

/** WCAG 2.1 AA minimums: 1.4.3 text, 1.4.11 user-interface components and graphics. */
export const TEXT_MIN = 4.5;
export const NON_TEXT_MIN = 3;

const HEX = /^#[0-9a-fA-F]{6}$/;
export const isHexColour = (s: string) => HEX.test(s);

function channels(hex: string): [number, number, number] {
  if (!HEX.test(hex)) throw new Error(`not a #rrggbb colour: ${hex}`);
  const n = Number.parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

export function relativeLuminance(hex: string): number {
  const lin = (c: number) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  const [r, g, b] = channels(hex);
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

export function contrastRatio(a: string, b: string): number {
  const la = relativeLuminance(a);
  const lb = relativeLuminance(b);
  return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05);
}

/** The label colour (ink or white) that reads best on the accent. */
export function labelOn(accent: string): string {
  return contrastRatio(accent, LABEL_INK) >= contrastRatio(accent, LABEL_WHITE) ? LABEL_INK : LABEL_WHITE;
}

/**
 * What the accent is used for on the calculator page (components/embed/*), each with the
 * colour it must stand out against and the minimum ratio:
 * - the filled "Show my groups" button and the focus ring of the inputs are drawn in the
 *   accent on the page background: non-text contrast, 3:1;
 * - the button's label is written on the accent (in ink or white, whichever is better):
 *   text contrast, 4.5:1.
 * The accent is never used as text on the page background, and the bars use the
 * groups' own colours, not the accent.
 */
export function accentChecks(accent: string, theme: Theme) {
  const label = labelOn(accent);
  return [
    { use: `the button and focus ring against the ${theme} background`, ratio: contrastRatio(accent, THEME_BACKGROUND[theme]), min: NON_TEXT_MIN },
    { use: 'the button label on this colour', ratio: contrastRatio(accent, label), min: TEXT_MIN },
  ];
}

export function accentPasses(accent: string, theme: Theme): boolean {
  return accentChecks(accent, theme).every((c) => c.ratio >= c.min);
}

// HSL by the CSS Color 4 conversion, so "same hue, other lightness" means what a designer expects.
function toHsl(hex: string): [number, number, number] {
  const [r, g, b] = channels(hex).map((c) => c / 255);
  const max = Math.max(r, g, b);
  const min = Math.min(r, g, b);
  const l = (max + min) / 2;
  const d = max - min;
  if (d === 0) return [0, 0, l];
  const s = d / (1 - Math.abs(2 * l - 1));
  const h = max === r ? ((g - b) / d + 6) % 6 : max === g ? (b - r) / d + 2 : (r - g) / d + 4;
  return [h * 60, s, l];
}

function fromHsl(h: number, s: number, l: number): string {
  const f = (n: number) => {
    const k = (n + h / 30) % 12;
    const a = s * Math.min(l, 1 - l);
    return l - a * Math.max(-1, Math.min(k - 3, 9 - k, 1));
  };
  return `#${[f(0), f(8), f(4)].map((v) => Math.round(v * 255).toString(16).padStart(2, '0')).join('')}`;
}

/**
 * The nearest colour that passes on this theme: the same hue and saturation, the
 * lightness moved as little as possible (in steps of 0.1 %, darker or lighter, the
 * smaller move wins). Pure black and white always pass one way, so there is always one.
 */
export function nearestPassingAccent(accent: string, theme: Theme): string {
  const hex = accent.toLowerCase();
  if (accentPasses(hex, theme)) return hex;
  const [h, s, l] = toHsl(hex);
  for (let step = 1; step <= 1000; step++) {
    const delta = step / 1000;
    for (const candidateL of [l - delta, l + delta]) {
      if (candidateL < 0 || candidateL > 1) continue;
      const candidate = fromHsl(h, s, candidateL);
      if (candidate !== hex && accentPasses(candidate, theme)) return candidate;
    }
  }
  return theme === 'light' ? '#000000' : '#ffffff';
}

/** Why the accent fails on this theme, in words for the publisher, or null when it passes. */
export function accentProblem(accent: string, theme: Theme): { message: string; suggestion: string } | null {
  const failing = accentChecks(accent, theme).filter((c) => c.ratio < c.min);
  if (!failing.length) return null;
  const suggestion = nearestPassingAccent(accent, theme);
  const reasons = failing.map((c) => `the contrast of ${c.use} is only ${floor2(c.ratio)}:1 (${c.min}:1 needed)`).join(', and ');
  return { message: `${accent.toLowerCase()} is hard to see on the ${theme} theme: ${reasons}. The nearest colour that passes is ${suggestion}.`, suggestion };
}

/** Rounded down, so a ratio just under the minimum never reads as the minimum. */
const floor2 = (x: number) => (Math.floor(x * 100) / 100).toFixed(2);
