/**
 * The app's one formatting module: numbers, percentages, dates and money, the same on the
 * server and in the browser. Pure (Intl only, no I/O), so client components, pages, mail
 * and scripts can all use it. One locale and, by default, one time zone (UTC), so a page
 * rendered on the server reads the same after the browser takes over.
 */
export const LOCALE = 'en-GB';
export const DEFAULT_TIME_ZONE = 'UTC';
const NONE = '—';

type Maybe = number | null | undefined;
const usable = (v: Maybe): v is number => typeof v === 'number' && Number.isFinite(v);

const cache = new Map<string, Intl.NumberFormat>();
function numberFormat(options: Intl.NumberFormatOptions, locale = LOCALE): Intl.NumberFormat {
  const key = `${locale} ${JSON.stringify(options)}`;
  let f = cache.get(key);
  if (!f) cache.set(key, (f = new Intl.NumberFormat(locale, options)));
  return f;
}

/** A minus sign, not a hyphen, so negative numbers line up and read as numbers. */
const withMinus = (text: string) => text.replace(/^-/, '−');

/** Whole counts with thousands separators: 12,480. */
export function formatCount(v: Maybe): string {
  if (!usable(v)) return NONE;
  return withMinus(numberFormat({ maximumFractionDigits: 0 }).format(Math.round(v)));
}

/** A number with a fixed number of decimals and thousands separators: 1,234.5. */
export function formatFixed(v: Maybe, decimals = 1): string {
  if (!usable(v)) return NONE;
  const text = numberFormat({ minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(v);
  // "-0.0" says nothing a reader can use.
  return withMinus(/^-0(\.0+)?$/.test(text) ? text.slice(1) : text);
}

/**
 * Decimals that give `digits` significant digits to a value of this size (never below 0):
 * 24.37 → 1 for 3 digits, 0.0437 → 3, 1,820 → 0. Used to give related numbers one precision.
 */
export function decimalsFor(v: number, digits = 3): number {
  if (!Number.isFinite(v) || v === 0) return Math.max(0, digits - 1);
  const magnitude = Math.floor(Math.log10(Math.abs(v)));
  return Math.max(0, digits - 1 - magnitude);
}

/**
 * A measurement with about `digits` significant digits and grouping: 24.4, 0.0437, 1,820.
 * Large values keep their whole digits (123,456 stays 123,456, not 123,000).
 */
export function formatNumber(v: Maybe, digits = 3): string {
  if (!usable(v)) return NONE;
  if (v === 0) return '0';
  if (Math.abs(v) < 10 ** -(digits + 1)) return formatSmall(v, digits);
  return formatFixed(v, decimalsFor(v, digits));
}

/**
 * Values that are often tiny (entropy, tolerances, p-values): "< 0.001" below the floor,
 * "0" for exactly zero, otherwise `decimals` decimals. Never scientific notation.
 */
export function formatSmall(v: Maybe, decimals = 3): string {
  if (!usable(v)) return NONE;
  if (v === 0) return '0';
  const floor = 10 ** -decimals;
  if (Math.abs(v) < floor) return `${v < 0 ? '> −' : '< '}${formatFixed(floor, decimals)}`;
  return formatFixed(v, decimals);
}

/**
 * Mean ± standard deviation with one precision for both, set by the spread (two
 * significant digits of the sd): "24.3 ± 2.1", "1,204 ± 310", "0.052 ± 0.011".
 */
export function formatMeanSd(mean: Maybe, sd: Maybe): string {
  if (!usable(mean)) return NONE;
  if (!usable(sd)) return formatNumber(mean);
  const decimals = Math.min(6, sd > 0 ? decimalsFor(sd, 2) : decimalsFor(mean, 3));
  return `${formatFixed(mean, decimals)} ± ${formatFixed(sd, decimals)}`;
}

/** A share (0..1) as a percentage: 0.843 → "84%", with `decimals` → "84.3%". Tiny non-zero shares read "< 1%". */
export function formatPercent(v: Maybe, decimals = 0): string {
  if (!usable(v)) return NONE;
  const floor = 10 ** -decimals / 100;
  if (v > 0 && v < floor / 2) return `< ${numberFormat({ style: 'percent', minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(floor)}`;
  return withMinus(numberFormat({ style: 'percent', minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(v));
}

/** Money from minor units (cents): 7898 → "€78.98", -7898 → "−€78.98"; whole amounts optionally without cents. */
export function formatMoney(cents: Maybe, currency = 'eur', opts: { dropZeroCents?: boolean } = {}): string {
  if (!usable(cents)) return NONE;
  const whole = opts.dropZeroCents && cents % 100 === 0;
  const text = numberFormat({ style: 'currency', currency: currency.toUpperCase(), minimumFractionDigits: whole ? 0 : 2, maximumFractionDigits: whole ? 0 : 2 }).format(Math.abs(cents) / 100);
  return cents < 0 ? `−${text}` : text;
}

/** File sizes in binary units: 980 B, 12.4 KB, 3 MB. */
export function formatBytes(n: Maybe): string {
  if (!usable(n)) return NONE;
  if (n < 1024) return `${formatCount(n)} B`;
  if (n < 1024 * 1024) return `${formatFixed(n / 1024, n % 1024 === 0 ? 0 : 1)} KB`;
  return `${formatFixed(n / (1024 * 1024), n % (1024 * 1024) === 0 ? 0 : 1)} MB`;
}

type DateInput = Date | string | number | null | undefined;
const toDate = (v: DateInput): Date | null => {
  if (v === null || v === undefined || v === '') return null;
  const d = v instanceof Date ? v : new Date(v);
  return Number.isNaN(d.getTime()) ? null : d;
};

/** "2 Dec 2026" (in the given zone, UTC by default). */
export function formatDate(v: DateInput, timeZone = DEFAULT_TIME_ZONE): string {
  const d = toDate(v);
  if (!d) return NONE;
  return new Intl.DateTimeFormat(LOCALE, { day: 'numeric', month: 'short', year: 'numeric', timeZone }).format(d);
}

/** "2 Dec 2026, 14:36 UTC": always with the zone, so nobody guesses whose clock it is. */
export function formatDateTime(v: DateInput, timeZone = DEFAULT_TIME_ZONE): string {
  const d = toDate(v);
  if (!d) return NONE;
  return new Intl.DateTimeFormat(LOCALE, { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone, timeZoneName: 'short' }).format(d);
}

/** A duration in milliseconds: "850 ms", "4.2 s", "3 min 5 s". */
export function formatDuration(ms: Maybe): string {
  if (!usable(ms)) return NONE;
  if (ms < 1000) return `${formatCount(ms)} ms`;
  if (ms < 60_000) return `${formatFixed(ms / 1000, 1)} s`;
  const minutes = Math.floor(ms / 60_000);
  return `${formatCount(minutes)} min ${Math.round((ms % 60_000) / 1000)} s`;
}

/**
 * A membership probability as visitors read it: whole percents, and the two ends as
 * "over 99%" / "under 1%" so a rounded "100%" or "0%" never claims certainty.
 */
export function formatProbability(probability: number, lang: ProbabilityWords = ENGLISH_PROBABILITY): string {
  const whole = numberFormat({ style: 'percent', maximumFractionDigits: 0 }, lang.locale);
  if (probability >= 0.995) return lang.over(whole.format(0.99));
  if (probability < 0.005) return lang.under(whole.format(0.01));
  return whole.format(probability);
}

/** A calculator language's locale and its words for the two ends ("over 99%"). */
export interface ProbabilityWords {
  locale: string;
  over: (percent: string) => string;
  under: (percent: string) => string;
}
const ENGLISH_PROBABILITY: ProbabilityWords = { locale: LOCALE, over: (p) => `over ${p}`, under: (p) => `under ${p}` };

/**
 * A number a visitor reads or types back, in a calculator language's locale: as many
 * decimals as it has (up to 6), grouped the locale's way: 1,234.5 / 1.234,5 / 1 234,5.
 */
export function formatInputNumber(v: number, locale: string): string {
  if (!Number.isFinite(v)) return NONE;
  return withMinus(numberFormat({ maximumFractionDigits: 6 }, locale).format(v));
}

/**
 * The locale's marks in the shape vega's number formats take (d3-format), so the chart's
 * axis reads "20 %" in German as the rest of the calculator does.
 */
export function chartNumberLocale(locale: string): { decimal: string; thousands: string; grouping: number[]; currency: [string, string]; percent: string; minus: string } {
  const parts = new Intl.NumberFormat(locale).formatToParts(12345.6);
  const pct = new Intl.NumberFormat(locale, { style: 'percent' }).formatToParts(0.5);
  const sign = pct.findIndex((p) => p.type === 'percentSign');
  const before = sign > 0 && pct[sign - 1].type === 'literal' ? pct[sign - 1].value : '';
  return {
    decimal: parts.find((p) => p.type === 'decimal')?.value ?? '.',
    thousands: parts.find((p) => p.type === 'group')?.value ?? ',',
    grouping: [3],
    currency: ['', ''],
    percent: `${before}%`,
    minus: '−',
  };
}
