import { describe, expect, it } from 'vitest';
import { decimalsFor, formatBytes, formatCount, formatDate, formatDateTime, formatDuration, formatFixed, formatMeanSd, formatMoney, formatNumber, formatPercent, formatSmall } from '@/lib/format';

describe('lib/format numbers', () => {
  it('groups thousands in counts and measurements', () => {
    expect(formatCount(12480)).toBe('12,480');
    expect(formatCount(1234567)).toBe('1,234,567');
    expect(formatFixed(-4321.25, 1)).toBe('−4,321.3');
    expect(formatNumber(123456.7)).toBe('123,457');
  });

  it('keeps about three significant digits, never scientific notation', () => {
    expect(formatNumber(24.3712)).toBe('24.4');
    expect(formatNumber(0.04372)).toBe('0.0437');
    expect(formatNumber(1820.4)).toBe('1,820');
    expect(formatNumber(0)).toBe('0');
    expect(formatNumber(2.19e-10)).not.toMatch(/e/i);
    expect(decimalsFor(24.37, 3)).toBe(1);
    expect(decimalsFor(0.0437, 3)).toBe(4);
  });

  it('writes tiny values such as entropy as "< 0.001"', () => {
    expect(formatSmall(2.19e-10)).toBe('< 0.001');
    expect(formatSmall(0)).toBe('0');
    expect(formatSmall(0.2345)).toBe('0.235');
    expect(formatSmall(0.2345, 2)).toBe('0.23');
  });

  it('gives a mean and its sd one precision, set by the spread', () => {
    expect(formatMeanSd(24.3712, 2.1234)).toBe('24.4 ± 2.1');
    expect(formatMeanSd(1204.2, 310.7)).toBe('1,204 ± 311');
    expect(formatMeanSd(0.05213, 0.01109)).toBe('0.052 ± 0.011');
    expect(formatMeanSd(12, null)).toBe('12.0');
  });

  it('writes percentages one way, with tiny shares as "< 1%"', () => {
    expect(formatPercent(0.843)).toBe('84%');
    expect(formatPercent(0.8437, 1)).toBe('84.4%');
    expect(formatPercent(0.001)).toBe('< 1%');
    expect(formatPercent(0)).toBe('0%');
  });

  it('writes money with the currency, a real minus sign and optional whole amounts', () => {
    expect(formatMoney(7898)).toBe('€78.98');
    expect(formatMoney(-7898)).toBe('−€78.98');
    expect(formatMoney(1900, 'eur', { dropZeroCents: true })).toBe('€19');
    expect(formatMoney(123456)).toBe('€1,234.56');
  });

  it('says "—" for missing or non-finite values', () => {
    for (const f of [formatCount, formatNumber, formatSmall, formatPercent, formatMoney, formatBytes, formatDuration]) {
      expect(f(null)).toBe('—');
      expect(f(Number.NaN)).toBe('—');
    }
    expect(formatMeanSd(undefined, 1)).toBe('—');
  });

  it('sizes and durations', () => {
    expect(formatBytes(980)).toBe('980 B');
    expect(formatBytes(12.5 * 1024)).toBe('12.5 KB');
    expect(formatBytes(3 * 1024 * 1024)).toBe('3 MB');
    expect(formatDuration(850)).toBe('850 ms');
    expect(formatDuration(4200)).toBe('4.2 s');
  });
});

describe('lib/format dates', () => {
  const at = '2026-12-02T14:05:00Z';
  it('always names the time zone', () => {
    expect(formatDateTime(at)).toBe('2 Dec 2026, 14:05 UTC');
    expect(formatDateTime(new Date(at), 'Europe/Berlin')).toMatch(/^2 Dec 2026, 15:05 (CET|GMT\+1)$/);
  });
  it('dates without time, and nothing for no date', () => {
    expect(formatDate(at)).toBe('2 Dec 2026');
    expect(formatDate('2026-12-31T23:30:00Z')).toBe('31 Dec 2026');
    expect(formatDate(null)).toBe('—');
    expect(formatDateTime('not a date')).toBe('—');
  });
});
