/**
 * The app's own security headers, in one place for next.config.mjs (every page and
 * route Next serves) and the app server's fast path (lib/server), which answers the
 * scoring route before Next's router. Plain ESM so next.config.mjs can import it.
 */

/**
 * The directives of the app's own Content-Security-Policy, but frame-ancestors (which
 * differs: 'none' for the app, the embed's allowed hosts for a calculator).
 * - script-src 'unsafe-inline': Next's App Router streams its bootstrap and flight data
 *   as inline <script> tags; without a per-request nonce (which would make every page
 *   dynamic) they need it. No host but our own may serve scripts.
 * - no 'unsafe-eval' in production: vega runs chart expressions through
 *   vega-interpreter instead of the Function constructor. The dev server needs eval.
 * - style-src 'unsafe-inline': React and vega write style attributes.
 * @returns {string[]}
 */
export function appDirectives() {
  const evalAllowed = process.env.NODE_ENV !== 'production';
  return [
    "default-src 'self'",
    `script-src 'self' 'unsafe-inline'${evalAllowed ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    // the studio previews its calculators in an iframe of our own origin
    "frame-src 'self'",
    // forms post only to us; checkout leaves by navigation (location.assign), not a form
    "form-action 'self'",
    "base-uri 'self'",
    "object-src 'none'",
    "worker-src 'self' blob:",
    "manifest-src 'self'",
  ];
}

/** The app's own policy: every page but the calculator. */
export function appPolicy() {
  return [...appDirectives(), "frame-ancestors 'none'"].join('; ');
}

/**
 * Headers of a response that is never framed, with its policy.
 * @param {string} policy
 * @returns {{ key: string, value: string }[]}
 */
function neverFramed(policy) {
  return [
    { key: 'X-Frame-Options', value: 'DENY' },
    { key: 'Content-Security-Policy', value: policy },
    { key: 'X-Content-Type-Options', value: 'nosniff' },
    { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
  ];
}

/** Headers of JSON route handlers: nothing in a JSON answer may load or run anything. */
export function apiHeaders() {
  return neverFramed("default-src 'none'; frame-ancestors 'none'");
}

/** Headers of every page that is never framed (all but the calculator page). */
export function unframedHeaders() {
  return neverFramed(appPolicy());
}
