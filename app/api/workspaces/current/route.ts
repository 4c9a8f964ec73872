import { readJson, route } from '@/lib/http/handler';
import { requireUser } from '@/lib/auth/guard';
import { workspaceCookieHeader } from '@/lib/auth/cookies';
import { switchWorkspaceSchema } from '@/lib/accounts/schemas';
import { switchWorkspace } from '@/lib/accounts/workspaces';

/** Switch the current workspace, after checking the caller belongs to it. */
export const POST = route(async (request) => {
  const actor = await requireUser(request);
  const { workspaceId } = await readJson(request, switchWorkspaceSchema);
  const workspace = await switchWorkspace(actor, workspaceId);
  return Response.json({ workspace }, { headers: { 'set-cookie': workspaceCookieHeader(workspace.id) } });
});
