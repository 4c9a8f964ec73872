import { readJson, route } from '@/lib/http/handler';
import { verifySchema } from '@/lib/accounts/schemas';
import { verifyEmail } from '@/lib/accounts/signup';

/** Public: confirm an e-mail address with the token from the mail. */
export const POST = route(async (request) => {
  const { token } = await readJson(request, verifySchema);
  const { email } = await verifyEmail(token, request);
  return Response.json({ verified: true, email });
});
