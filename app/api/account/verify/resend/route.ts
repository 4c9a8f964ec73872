import { readJson, route } from '@/lib/http/handler';
import { emailOnlySchema } from '@/lib/accounts/schemas';
import { resendVerification } from '@/lib/accounts/signup';

/** Public: mail a new confirmation link. Same answer whether or not the address is known. */
export const POST = route(async (request) => {
  const { email } = await readJson(request, emailOnlySchema);
  await resendVerification(email, request);
  return Response.json({ message: 'If that address has an account waiting for confirmation, a new link is on its way.' }, { status: 202 });
});
