/**
 * Where to send someone after sign-in (or sign-out): only a path on this site.
 * Browsers strip tabs and newlines from URLs and read `\` as `/`, so `/\t/evil.example`
 * or `/\evil.example` would leave the site; control characters in a Location header
 * make the server fail. So the value is decoded (percent-encoding hides the same
 * tricks) and refused when any form of it has a control character, a backslash, or
 * does not start with exactly one `/`. Anything refused becomes the fallback.
 */
const MAX_RETURN_PATH = 2000;
// C0 controls, DEL and C1 controls (U+0080–U+009F).
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
const CHECK_ORIGIN = 'http://return-path.invalid';

/** Every form the value takes while percent-decoding it (a few rounds; undecodable counts as hostile). */
function decodedForms(value: string): string[] | null {
  const forms = [value];
  let current = value;
  for (let i = 0; i < 3 && current.includes('%'); i++) {
    try {
      current = decodeURIComponent(current);
    } catch {
      return null;
    }
    forms.push(current);
  }
  return forms;
}

function isPlainPath(form: string): boolean {
  return form.startsWith('/') && !form.startsWith('//') && !form.includes('\\') && !CONTROL.test(form);
}

export function safeReturnPath(value: string | null | undefined, fallback = '/studio'): string {
  if (typeof value !== 'string' || !value || value.length > MAX_RETURN_PATH) return fallback;
  const forms = decodedForms(value);
  if (!forms || !forms.every(isPlainPath)) return fallback;
  // Belt and braces: the URL parser itself must keep it on this origin.
  let parsed: URL;
  try {
    parsed = new URL(value, CHECK_ORIGIN);
  } catch {
    return fallback;
  }
  if (parsed.origin !== CHECK_ORIGIN || parsed.pathname.startsWith('//')) return fallback;
  return `${parsed.pathname}${parsed.search}${parsed.hash}`;
}

/**
 * next-auth's `redirect` callback: `url` is the callbackUrl from the body, query or
 * callback-url cookie — a path, or an absolute URL of this app (next-auth stores the
 * absolute form in the cookie). Answers an absolute URL on `baseUrl`, never anything else.
 */
export function safeRedirectUrl(url: string, baseUrl: string, fallback = '/studio'): string {
  const origin = new URL(baseUrl).origin;
  let path: string = url;
  if (typeof url === 'string' && !url.startsWith('/') && !CONTROL.test(url)) {
    try {
      const absolute = new URL(url);
      path = absolute.origin === origin ? `${absolute.pathname}${absolute.search}${absolute.hash}` : '';
    } catch {
      path = '';
    }
  }
  return `${origin}${safeReturnPath(path, fallback)}`;
}

/**
 * Whether a callbackUrl as next-auth receives it (query or callback-url cookie) can be
 * handed to next-auth unchanged. next-auth answers 500 to anything that is not an
 * http(s) URL or absolute path before our redirect callback runs, so the auth route
 * replaces such values first (app/api/auth/[...nextauth]/route.ts).
 */
export function isSafeCallbackUrl(value: string, baseUrl: string): boolean {
  const safe = safeRedirectUrl(value, baseUrl);
  return value === safe || `${new URL(baseUrl).origin}${value}` === safe;
}
