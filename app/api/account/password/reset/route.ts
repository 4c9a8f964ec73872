import { readJson, route } from '@/lib/http/handler';
import { resetPasswordSchema } from '@/lib/accounts/schemas';
import { resetPassword } from '@/lib/accounts/password';

/** Public: choose a new password with the token from the reset mail. */
export const POST = route(async (request) => {
  const { token, password } = await readJson(request, resetPasswordSchema);
  const { email } = await resetPassword(token, password, request);
  return Response.json({ reset: true, email });
});
