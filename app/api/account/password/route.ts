import { changePassword } from '@/lib/accounts/account';
import { changePasswordSchema } from '@/lib/accounts/account-schemas';
import { requireUser } from '@/lib/auth/guard';
import { readJson, route } from '@/lib/http/handler';

/** Change the password of the signed-in account; the current one is required and every session ends. */
export const PUT = route(async (request) => {
  const actor = await requireUser(request);
  const input = await readJson(request, changePasswordSchema);
  await changePassword(actor.user, input, request);
  return Response.json({ message: 'Your password is changed, and every session has ended, on this device too. Sign in again with the new password.', signInAgain: true });
});
