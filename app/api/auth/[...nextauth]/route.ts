import NextAuth from 'next-auth';
import { cookies } from 'next/headers';
import { NextRequest } from 'next/server';
import { authOptions } from '@/lib/auth/options';
import { isSafeCallbackUrl, safeRedirectUrl } from '@/lib/accounts/return-path';
import { AppError } from '@/lib/errors';
import { route } from '@/lib/http/handler';
import { declaredLength, discardBody, readBytesCapped } from '@/lib/http/body';

const handler = NextAuth(authOptions);
const CALLBACK_COOKIES = ['next-auth.callback-url', '__Secure-next-auth.callback-url'];

/** Sign-in and sign-out forms are a few fields; next-auth itself would read any body whole. */
const MAX_AUTH_BODY_BYTES = 16 * 1024;

type Ctx = { params: Promise<{ nextauth: string[] }> };

/**
 * next-auth itself answers 500 to a callbackUrl (query or callback-url cookie) that is
 * not an http(s) URL or path, before the redirect callback can refuse it, so a hostile
 * cookie would break every sign-in. Such values are replaced by the studio here (the
 * browser's cookie too); the redirect callback checks everything else.
 */
async function withSafeCallbackUrl(request: NextRequest, context: Ctx) {
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

/** The body is read here with a cap while it streams, then handed on from memory. */
const POST = route<Ctx>(
  async (request, context) => {
    const tooLarge = () => new AppError('payload_too_large', `The body is larger than ${MAX_AUTH_BODY_BYTES} bytes.`);
    if ((declaredLength(request.headers) ?? 0) > MAX_AUTH_BODY_BYTES) {
      await discardBody(request.body);
      throw tooLarge();
    }
    const body = await readBytesCapped(request.body, MAX_AUTH_BODY_BYTES, tooLarge);
    return withSafeCallbackUrl(new NextRequest(request.url, { method: 'POST', headers: request.headers, body: body as BodyInit }), context);
  },
  // next-auth checks its own CSRF token on these forms.
  { origin: 'any' },
);

export { withSafeCallbackUrl as GET, POST };
