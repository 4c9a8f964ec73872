import { z } from 'zod';
import { storedText } from '@/lib/http/text';

/**
 * Allowed host origins: exact scheme + host + port entries. Everything else a person
 * might paste (a path, a query, a trailing slash, upper case) is either normalised away
 * or refused with a reason, so the CSP built from the list is exactly what was meant.
 */
export const MAX_ALLOWED_ORIGINS = 20;

export type OriginCheck = { ok: true; origin: string } | { ok: false; reason: string };

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
  if ((url.pathname && url.pathname !== '/') || url.search || url.hash || /[?#]/.test(text.replace(/^https?:\/\/[^/]*/i, ''))) {
    return { ok: false, reason: 'must be only scheme, host and port (no path, query or fragment)' };
  }
  if (!url.hostname) return { ok: false, reason: 'has no host' };
  // URL drops the default port and lower-cases the host: the browser's own origin form.
  return { ok: true, origin: url.origin };
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
