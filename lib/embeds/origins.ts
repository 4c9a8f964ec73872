import { z } from 'zod';
import { storedText } from '@/lib/http/text';

/**
 * Allowed host origins: exact scheme + host + port entries. What a person pastes is
 * normalised (a page address keeps only its origin; a trailing slash, upper case and the
 * default port go) or refused with a reason, so the CSP built from the list is exactly
 * what was meant.
 */
export const MAX_ALLOWED_ORIGINS = 20;

/** `trimmed`: the entry was a page address; only its origin (scheme, host, port) is kept. */
export type OriginCheck = { ok: true; origin: string; trimmed?: true } | { ok: false; reason: string };

export function checkOrigin(input: string): OriginCheck {
  const text = input.trim();
  if (!text) return { ok: false, reason: 'is empty' };
  if (/[\s'";,]/.test(text)) return { ok: false, reason: 'contains spaces, quotes, commas or semicolons' };
  if (text.includes('*')) return { ok: false, reason: 'uses a wildcard; list each origin exactly' };
  if (!/^https?:\/\//i.test(text)) return { ok: false, reason: 'must start with https:// (or http:// for local testing)' };
  let url: URL;
  try {
    url = new URL(text);
  } catch {
    return { ok: false, reason: 'is not a valid address' };
  }
  if (url.username || url.password) return { ok: false, reason: 'must not contain a user name or password' };
  if (!url.hostname) return { ok: false, reason: 'has no host' };
  // People paste the address of the page the calculator sits on; the browser checks only
  // its origin, so keep that and say the rest was left out.
  const trimmed = (url.pathname && url.pathname !== '/') || url.search || url.hash || /[?#]/.test(text.replace(/^https?:\/\/[^/]*/i, ''));
  // URL drops the default port and lower-cases the host: the browser's own origin form.
  return trimmed ? { ok: true, origin: url.origin, trimmed: true } : { ok: true, origin: url.origin };
}

export function normalizeOrigin(input: string): string | null {
  const r = checkOrigin(input);
  return r.ok ? r.origin : null;
}

/** zod: a list of origins, normalised and de-duplicated, with a message per bad entry. */
export const allowedOriginsSchema = z
  .array(storedText('The origin').max(300, 'is longer than 300 characters'))
  .max(MAX_ALLOWED_ORIGINS, `List at most ${MAX_ALLOWED_ORIGINS} origins.`)
  .transform((list, ctx) => {
    const out: string[] = [];
    list.forEach((entry, i) => {
      const r = checkOrigin(entry);
      if (!r.ok) ctx.addIssue({ code: 'custom', path: [i], message: `"${entry.slice(0, 80)}" ${r.reason}.` });
      else if (!out.includes(r.origin)) out.push(r.origin);
    });
    return out;
  });

/**
 * The frame-ancestors directive: 'self' (the studio's live preview runs on our own
 * origin) plus each allowed host. An embed with no hosts can only be previewed.
 */
export function frameAncestors(origins: readonly string[]): string {
  const safe = origins.map(normalizeOrigin).filter((o): o is string => o !== null);
  return ["frame-ancestors 'self'", ...safe].join(' ');
}

/** The origin of an Origin header, or of a Referer when there is no Origin; null if neither. */
export function callerOrigin(headers: { get(name: string): string | null }): string | null {
  const origin = headers.get('origin');
  if (origin && origin !== 'null') return normalizeOrigin(origin) ?? 'invalid';
  if (origin === 'null') return 'null';
  const referer = headers.get('referer');
  if (!referer) return null;
  try {
    return new URL(referer).origin;
  } catch {
    return 'invalid';
  }
}
