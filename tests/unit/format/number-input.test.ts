import { describe, expect, it } from 'vitest';
import { chartNumberLocale, formatInputNumber, formatProbability } from '@/lib/format';
import { localeOf, type Language } from '@/lib/i18n/languages';
import { parseLocaleNumber } from '@/lib/number-input';

const value = (text: string, language: Language) => {
  const r = parseLocaleNumber(text, language);
  return r.ok ? r.value : r.problem;
};

describe('reading typed numbers the language’s way', () => {
  it('English: dot decimals, comma groups of three', () => {
    expect(value('31.5', 'en')).toBe(31.5);
    expect(value('1,234.5', 'en')).toBe(1234.5);
    expect(value('1,234', 'en')).toBe(1234);
    expect(value('1,234,567', 'en')).toBe(1234567);
    expect(value('.5', 'en')).toBe(0.5);
    expect(value('-2.25', 'en')).toBe(-2.25);
    expect(value('  45 ', 'en')).toBe(45);
    // A comma that cannot be grouping is the decimal mark, as before.
    expect(value('24,5', 'en')).toBe(24.5);
    expect(value('1 234.5', 'en')).toBe(1234.5);
  });

  it('German and Spanish: comma decimals, dot groups of three', () => {
    for (const language of ['de', 'es'] as const) {
      expect(value('31,5', language)).toBe(31.5);
      expect(value('1.234,5', language)).toBe(1234.5);
      expect(value('1234,5', language)).toBe(1234.5);
      expect(value('1.234', language)).toBe(1234);
      expect(value('1,234', language)).toBe(1.234);
      expect(value('12.345.678', language)).toBe(12345678);
      expect(value(',5', language)).toBe(0.5);
      expect(value('−3,5', language)).toBe(-3.5);
      // A single dot that cannot be grouping can only be a decimal point.
      expect(value('31.5', language)).toBe(31.5);
    }
  });

  it('French: comma decimals, spaces (also no-break and narrow no-break) group', () => {
    expect(value('31,5', 'fr')).toBe(31.5);
    expect(value('1 234,5', 'fr')).toBe(1234.5);
    expect(value('1\u00a0234,5', 'fr')).toBe(1234.5);
    expect(value('1\u202f234,5', 'fr')).toBe(1234.5);
    expect(value('12\u202f345\u202f678', 'fr')).toBe(12345678);
    expect(value('1.234,5', 'fr')).toBe(1234.5);
  });

  it('refuses ambiguous or mixed forms rather than guessing', () => {
    for (const language of ['de', 'fr', 'es'] as const) {
      expect(value('1.23,4', language)).toBe('ambiguous');
      expect(value('1,2,3', language)).toBe('ambiguous');
      expect(value('1,234.5', language)).toBe('ambiguous');
      expect(value('1.2.3', language)).toBe('ambiguous');
      expect(value('12 34', language)).toBe('ambiguous');
      expect(value('1 234.567,5', language)).toBe('ambiguous');
    }
    expect(value('1.234,5', 'en')).toBe('ambiguous');
    expect(value('1,23,4', 'en')).toBe('ambiguous');
    expect(value('1.2.3', 'en')).toBe('ambiguous');
  });

  it('refuses what is not a number at all', () => {
    for (const language of ['en', 'de', 'fr', 'es'] as const) {
      for (const text of ['', '  ', 'abc', '31,5 km', '1e3', '31,', '0x10', '--1', ',', '.', 'Infinity']) {
        expect(parseLocaleNumber(text, language).ok, `${language} ${JSON.stringify(text)}`).toBe(false);
      }
    }
  });

  it('reads back what the calculator writes (ranges and hints)', () => {
    for (const language of ['en', 'de', 'fr', 'es'] as const) {
      for (const v of [0, 31.5, 1234.5, 3000, 12345.25, -7.5]) {
        expect(value(formatInputNumber(v, localeOf(language)), language), `${language} ${v}`).toBe(v);
      }
    }
  });
});

describe('numbers shown in the language’s format', () => {
  it('writes ranges and probabilities with the locale’s marks and words', () => {
    expect(formatInputNumber(1234.5, localeOf('de'))).toBe('1.234,5');
    expect(formatInputNumber(1234.5, localeOf('fr'))).toBe('1\u202f234,5');
    expect(formatInputNumber(1234.5, localeOf('en'))).toBe('1,234.5');
    expect(formatProbability(0.43, { locale: localeOf('de'), over: (p) => `über ${p}`, under: (p) => `unter ${p}` })).toBe('43\u00a0%');
    expect(formatProbability(0.999, { locale: localeOf('fr'), over: (p) => `plus de ${p}`, under: (p) => `moins de ${p}` })).toMatch(/^plus de 99[\u00a0\u202f]%$/);
    expect(formatProbability(0.43)).toBe('43%');
  });

  it('gives the chart the locale’s marks', () => {
    expect(chartNumberLocale(localeOf('en'))).toMatchObject({ decimal: '.', thousands: ',', percent: '%' });
    expect(chartNumberLocale(localeOf('de'))).toMatchObject({ decimal: ',', thousands: '.', percent: '\u00a0%' });
    expect(chartNumberLocale(localeOf('fr')).decimal).toBe(',');
    expect(chartNumberLocale(localeOf('fr')).percent).toMatch(/^[\u00a0\u202f]%$/);
    expect(chartNumberLocale(localeOf('es'))).toMatchObject({ decimal: ',', thousands: '.' });
  });
});
