import { z } from 'zod';
import { parseWith, readJson, route } from '@/lib/http/handler';
import { readActor } from '@/lib/auth/guard';
import { workspaceCookieHeader } from '@/lib/auth/cookies';
import { acceptInvitationSchema, token } from '@/lib/accounts/schemas';
import { acceptInvitation, describeInvitation } from '@/lib/accounts/invitations';

/** Public: what an invitation link offers (workspace, role, whether to sign in or sign up). */
export const GET = route(async (request) => {
  const query = parseWith(z.object({ token }), Object.fromEntries(new URL(request.url).searchParams), 'address');
  return Response.json({ invitation: await describeInvitation(query.token) });
});

/** Accept an invitation: signed in as the invited address, or as a new account. */
export const POST = route(async (request) => {
  const input = await readJson(request, acceptInvitationSchema);
  const actor = await readActor(request);
  const result = await acceptInvitation(input.token, input, actor ? { id: actor.user.id, email: actor.user.email } : null, request);
  return Response.json(result, { headers: { 'set-cookie': workspaceCookieHeader(result.workspaceId) } });
});
