import NextAuth from 'next-auth';
import { NextRequest } from 'next/server';
import { authOptions } from '@/lib/auth/options';
import { AppError } from '@/lib/errors';
import { route } from '@/lib/http/handler';
import { declaredLength, discardBody, readBytesCapped } from '@/lib/http/body';

const handler = NextAuth(authOptions);

/** Sign-in and sign-out forms are a few fields; next-auth itself would read any body whole. */
const MAX_AUTH_BODY_BYTES = 16 * 1024;

type Ctx = { params: Promise<{ nextauth: string[] }> };

/** The body is read here with a cap while it streams, then handed to next-auth from memory. */
const POST = route<Ctx>(
  async (request, context) => {
    const tooLarge = () => new AppError('payload_too_large', `The body is larger than ${MAX_AUTH_BODY_BYTES} bytes.`);
    if ((declaredLength(request.headers) ?? 0) > MAX_AUTH_BODY_BYTES) {
      await discardBody(request.body);
      throw tooLarge();
    }
    const body = await readBytesCapped(request.body, MAX_AUTH_BODY_BYTES, tooLarge);
    return handler(new NextRequest(request.url, { method: 'POST', headers: request.headers, body: body as BodyInit }), context);
  },
  // next-auth checks its own CSRF token on these forms.
  { origin: 'any' },
);

export { handler as GET, POST };
