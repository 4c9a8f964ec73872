import { loadServedEmbed, TOKEN_SHAPE } from '@/lib/scoring/served';
import { appDirectives } from '@/lib/http/security-headers.mjs';
import { frameAncestors } from './origins';

/**
 * The Content-Security-Policy of a calculator page: who may frame it (the embed's
 * allowed hosts and our own origin for the studio preview) first, then the app's own
 * directives (scripts, styles, fonts and connections from our origin only, no eval).
 * Unknown tokens get the strictest framing.
 */
export function calculatorPolicy(allowedOrigins: readonly string[]): string {
  return [frameAncestors(allowedOrigins), ...appDirectives()].join('; ');
}

/** A path segment decoded, or null for a broken %-escape (no calculator has one). */
function decodedSegment(segment: string): string | null {
  try {
    return decodeURIComponent(segment);
  } catch {
    return null;
  }
}

/** Policy for a request path under /embed/; null when the path is not a calculator. */
export async function framePolicyForPath(pathname: string): Promise<string | null> {
  const match = /^\/embed\/([^/]+)\/?$/.exec(pathname);
  if (!match) return null;
  const token = decodedSegment(match[1]);
  const embed = token !== null && TOKEN_SHAPE.test(token) ? await loadServedEmbed(token) : null;
  return calculatorPolicy(embed?.allowedOrigins ?? []);
}
