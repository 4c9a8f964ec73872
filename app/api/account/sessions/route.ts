import { route } from '@/lib/http/handler';
import { requireUser } from '@/lib/auth/guard';
import { clearSessionCookieHeader } from '@/lib/auth/cookies';
import { signOutEverywhere } from '@/lib/auth/sessions';

/** Sign out everywhere: ends every session of the caller (all browsers, this one too). */
export const DELETE = route(async (request) => {
  const actor = await requireUser(request);
  await signOutEverywhere(actor.user, request);
  return Response.json({ signedOut: true }, { headers: { 'set-cookie': clearSessionCookieHeader() } });
});
