/** Words for the support console: audit actions, detail summaries and short tokens (numbers and dates live in lib/format). */
/** Start and end of a token, enough to recognise it without a wall of characters. */
export function shortToken(token: string): string {
  return token.length > 14 ? `${token.slice(0, 8)}…${token.slice(-4)}` : token;
}

// Audit wording lives with the support lib so pages, tests and mails share one vocabulary.
export { ACTION_LABELS, actionLabel, detailSummary } from '@/lib/support/audit-words';
