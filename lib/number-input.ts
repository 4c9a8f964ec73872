/**
 * Reading a number a visitor typed, the way their language writes numbers. Pure, for the
 * calculator in the browser and for tests.
 *
 * The rule, per language (decimal mark D, grouping mark G):
 * - en: D is ".", G is ","; de, es, fr: D is ",", G is "." (fr also groups with spaces).
 * - Spaces (also no-break and narrow no-break spaces) group digits in threes in every language.
 * - G groups only when every group after the first has exactly three digits and the first
 *   has one to three: "1.234" in German is 1234, "1,234,567" in English 1234567.
 * - A single G that cannot be grouping is read as the decimal mark, since it cannot mean
 *   anything else: "31.5" in German and "31,5" in English are both 31.5.
 * - Both marks together only as groups then one decimal mark: "1.234,5" (de). Anything else
 *   ("1.23,4", "1,2,3", "1,234.5" in German, "12 34") is refused as ambiguous, never guessed.
 * No exponents, no thousands written with a trailing mark ("31,"), no words.
 */
import type { Language } from '@/lib/i18n/languages';

export type ParsedNumber = { ok: true; value: number } | { ok: false; problem: 'not_a_number' | 'ambiguous' };

const MARKS: Record<Language, { decimal: ',' | '.'; group: ',' | '.' }> = {
  en: { decimal: '.', group: ',' },
  de: { decimal: ',', group: '.' },
  fr: { decimal: ',', group: '.' },
  es: { decimal: ',', group: '.' },
};

const SPACES = /[ \u00a0\u202f\u2009]/;
const esc = (c: string) => (c === '.' ? '\\.' : c);

export function parseLocaleNumber(text: string, language: Language): ParsedNumber {
  const { decimal: D, group: G } = MARKS[language];
  let t = text.trim();
  let sign = 1;
  const signMatch = /^([+\-\u2212])\s*/.exec(t);
  if (signMatch) {
    sign = signMatch[1] === '+' ? 1 : -1;
    t = t.slice(signMatch[0].length);
  }
  if (!t || !/^[0-9.,\s\u00a0\u202f\u2009]+$/.test(t)) return { ok: false, problem: 'not_a_number' };
  if (!/[0-9]/.test(t)) return { ok: false, problem: 'not_a_number' };

  if (SPACES.test(t)) {
    // Digits grouped by spaces in threes, optionally then the decimal part.
    const spaced = new RegExp(`^\\d{1,3}(?:[ \\u00a0\\u202f\\u2009]\\d{3})+(?:${esc(D)}\\d+)?$`);
    if (!spaced.test(t)) return { ok: false, problem: 'ambiguous' };
    t = t.replace(/[ \u00a0\u202f\u2009]/g, '');
  }

  const decimals = t.split(D).length - 1;
  const groups = t.split(G).length - 1;
  const grouped = new RegExp(`^\\d{1,3}(?:${esc(G)}\\d{3})+`);
  let plain: string;
  if (decimals && groups) {
    const both = new RegExp(`^\\d{1,3}(?:${esc(G)}\\d{3})+${esc(D)}\\d+$`);
    if (!both.test(t)) return { ok: false, problem: 'ambiguous' };
    plain = t.split(G).join('').replace(D, '.');
  } else if (groups) {
    if (new RegExp(`${grouped.source}$`).test(t)) plain = t.split(G).join('');
    else if (groups === 1 && /^\d*[.,]\d+$/.test(t)) plain = t.replace(G, '.');
    else return { ok: false, problem: 'ambiguous' };
  } else if (decimals) {
    if (decimals > 1) return { ok: false, problem: 'ambiguous' };
    if (!/^\d*[.,]\d+$/.test(t)) return { ok: false, problem: 'not_a_number' };
    plain = t.replace(D, '.');
  } else {
    if (!/^\d+$/.test(t)) return { ok: false, problem: 'not_a_number' };
    plain = t;
  }
  const value = sign * Number(plain);
  return Number.isFinite(value) ? { ok: true, value: value === 0 ? 0 : value } : { ok: false, problem: 'not_a_number' };
}
