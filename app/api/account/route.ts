import { route } from '@/lib/http/handler';
import { requireUser } from '@/lib/auth/guard';
import { listMyWorkspaces } from '@/lib/accounts/workspaces';

/** The signed-in person and the workspaces they may switch between. */
export const GET = route(async (request) => {
  const actor = await requireUser(request);
  const workspaces = await listMyWorkspaces(actor.user.id);
  return Response.json({ user: { id: actor.user.id, email: actor.user.email, name: actor.user.name, isStaff: actor.isStaff }, workspaces });
});
