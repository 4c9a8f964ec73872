/** Display helpers for billing: euro cents, bytes and dates in one style. */
export function euros(cents: number, currency = 'eur'): string {
  const symbol = currency.toLowerCase() === 'eur' ? '€' : `${currency.toUpperCase()} `;
  return `${cents < 0 ? '−' : ''}${symbol}${(Math.abs(cents) / 100).toFixed(2)}`;
}

export function bytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(n % (1024 * 1024) === 0 ? 0 : 1)} MB`;
  if (n >= 1024) return `${Math.round(n / 1024)} KB`;
  return `${n} B`;
}

export function day(iso: string | null): string {
  if (!iso) return '—';
  return new Date(iso).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
}

export function whole(n: number): string {
  return n.toLocaleString('en');
}
