import { route } from '@/lib/http/handler';
import { requireWorkspace } from '@/lib/auth/guard';
import { teamOverview } from '@/lib/accounts/team';

/** Members, open invitations and seats of the current workspace (any member may look). */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  return Response.json({ workspace: { id: actor.workspace.id, name: actor.workspace.name }, role: actor.role, ...(await teamOverview(actor.workspace.id)) });
});
