/**
 * Display helpers for billing: euro cents, bytes and dates in one style, shared by the
 * billing pages and the receipts (pure, server and client).
 */
const DAY = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });

/** Cents as money: "€12.00", a credit as "−€78.98" (sign before the symbol, a real minus). */
export function formatMoney(cents: number, currency = 'eur'): string {
  const text = new Intl.NumberFormat('en-GB', { style: 'currency', currency: currency.toUpperCase(), minimumFractionDigits: 2 }).format(Math.abs(cents) / 100);
  return cents < 0 ? `−${text}` : text;
}
export const euros = formatMoney;

export function bytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(n % (1024 * 1024) === 0 ? 0 : 1)} MB`;
  if (n >= 1024) return `${Math.round(n / 1024)} KB`;
  return `${n} B`;
}

/** A day as "2 Dec 2026" (UTC, so server and browser agree). */
export function formatDay(value: string | Date | null | undefined): string {
  if (!value) return '—';
  return DAY.format(typeof value === 'string' ? new Date(value) : value);
}
export const day = formatDay;

export function whole(n: number): string {
  return n.toLocaleString('en-GB');
}
