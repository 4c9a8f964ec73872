import { idParam, readParams, route } from '@/lib/http/handler';
import { requireWorkspace } from '@/lib/auth/guard';
import { revokeInvitation } from '@/lib/accounts/invitations';

/** Owners withdraw an open invitation; its link stops working. */
export const DELETE = route(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'owner');
  const { id } = await readParams(params, idParam);
  await revokeInvitation(actor, id, request);
  return new Response(null, { status: 204 });
});
