import NextAuth from 'next-auth';
import { cookies } from 'next/headers';
import { NextRequest } from 'next/server';
import { authOptions } from '@/lib/auth/options';
import { isSafeCallbackUrl, safeRedirectUrl } from '@/lib/accounts/return-path';

const handler = NextAuth(authOptions);
const CALLBACK_COOKIES = ['next-auth.callback-url', '__Secure-next-auth.callback-url'];

/**
 * next-auth itself answers 500 to a callbackUrl (query or callback-url cookie) that is
 * not an http(s) URL or path, before the redirect callback can refuse it, so a hostile
 * cookie would break every sign-in. Such values are replaced by the studio here (the
 * browser's cookie too); the redirect callback checks everything else.
 */
async function withSafeCallbackUrl(request: NextRequest, context: { params: Promise<{ nextauth: string[] }> }) {
  const base = new URL(process.env.NEXTAUTH_URL ?? request.nextUrl.origin).origin;
  const jar = await cookies();
  for (const name of CALLBACK_COOKIES) {
    const value = jar.get(name)?.value;
    // Same attributes as next-auth's own callback-url cookie, so the browser's copy is replaced too.
    if (value && !isSafeCallbackUrl(value, base)) jar.set(name, safeRedirectUrl(value, base), { httpOnly: true, sameSite: 'lax', path: '/', secure: name.startsWith('__Secure-') });
  }
  const asked = request.nextUrl.searchParams.get('callbackUrl');
  if (asked !== null && !isSafeCallbackUrl(asked, base)) {
    const url = request.nextUrl.clone();
    url.searchParams.set('callbackUrl', safeRedirectUrl(asked, base));
    const body = request.method === 'GET' || request.method === 'HEAD' ? undefined : await request.arrayBuffer();
    request = new NextRequest(url, { method: request.method, headers: request.headers, body });
  }
  return handler(request, context);
}

export { withSafeCallbackUrl as GET, withSafeCallbackUrl as POST };
