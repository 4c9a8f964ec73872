import { readJson, route } from '@/lib/http/handler';
import { requireWorkspace } from '@/lib/auth/guard';
import { inviteSchema } from '@/lib/accounts/schemas';
import { createInvitation } from '@/lib/accounts/invitations';

/** Owners invite someone by e-mail; the link is mailed, never returned here. */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  const input = await readJson(request, inviteSchema);
  const invitation = await createInvitation(actor, input, request);
  return Response.json({ invitation: { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt.toISOString() } }, { status: 201 });
});
