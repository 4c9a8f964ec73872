import { AppError } from '@/lib/errors';

/**
 * Cross-site request refusal for state-changing route handlers. Browsers send Origin on
 * every cross-origin POST/PUT/PATCH/DELETE (and Sec-Fetch-Site on modern ones), so a form
 * or script on another site that rides a signed-in visitor's cookies is refused here.
 * Requests without either header come from servers and scripts, which carry no victim's
 * cookies, and are left to the route's own authentication.
 */
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The origins this app answers on: the request's own and the configured public URL. */
export function appOrigins(request: Request): string[] {
  const list = [new URL(request.url).origin];
  for (const configured of [process.env.NEXTAUTH_URL, process.env.PARTWISE_PUBLIC_URL]) {
    if (!configured) continue;
    try {
      list.push(new URL(configured).origin);
    } catch {}
  }
  return list;
}

export function assertSameOrigin(request: Request): void {
  if (SAFE_METHODS.has(request.method.toUpperCase())) return;
  const origin = request.headers.get('origin');
  if (origin !== null) {
    if (!appOrigins(request).includes(origin)) {
      throw new AppError('forbidden', 'This request came from another website and was refused. Use Partwise from its own pages.');
    }
    return;
  }
  if (request.headers.get('sec-fetch-site') === 'cross-site') {
    throw new AppError('forbidden', 'This request came from another website and was refused. Use Partwise from its own pages.');
  }
}
