import { readJson, route } from '@/lib/http/handler';
import { emailOnlySchema } from '@/lib/accounts/schemas';
import { requestPasswordReset } from '@/lib/accounts/password';

/** Public: mail a reset link. Same answer whether or not the address is known. */
export const POST = route(async (request) => {
  const { email } = await readJson(request, emailOnlySchema);
  await requestPasswordReset(email, request);
  return Response.json({ message: 'If an account uses that address, a link to choose a new password is on its way.' }, { status: 202 });
});
