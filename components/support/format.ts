/** Formatting shared by support pages; dates always in UTC so server and browser agree. */
export const fmtCount = (n: number) => n.toLocaleString('en-US');

export function fmtDateTime(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  return `${d.toISOString().slice(0, 10)} ${d.toISOString().slice(11, 16)} UTC`;
}

export function fmtDate(iso: string | null | undefined): string {
  return iso ? new Date(iso).toISOString().slice(0, 10) : '—';
}

/** Start and end of a token, enough to recognise it without a wall of characters. */
export function shortToken(token: string): string {
  return token.length > 14 ? `${token.slice(0, 8)}…${token.slice(-4)}` : token;
}

// Audit wording lives with the support lib so pages, tests and mails share one vocabulary.
export { ACTION_LABELS, actionLabel, detailSummary } from '@/lib/support/audit-words';
