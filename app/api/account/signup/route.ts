import { readJson, route } from '@/lib/http/handler';
import { signUpSchema } from '@/lib/accounts/schemas';
import { SIGN_UP_ANSWER, signUp } from '@/lib/accounts/signup';

/**
 * Public: create an account and its first workspace; a confirmation mail follows.
 * The answer is the same whether the address is new or already has an account (its
 * holder is mailed instead), like the forgot-password route: no account oracle.
 */
export const POST = route(async (request) => {
  const input = await readJson(request, signUpSchema);
  await signUp(input, request);
  return Response.json(SIGN_UP_ANSWER, { status: 202 });
});
