import { readJson, route } from '@/lib/http/handler';
import { requireUser } from '@/lib/auth/guard';
import { workspaceCookieHeader } from '@/lib/auth/cookies';
import { createWorkspaceSchema } from '@/lib/accounts/schemas';
import { createWorkspace, listMyWorkspaces } from '@/lib/accounts/workspaces';

/** The caller's workspaces with their role in each. */
export const GET = route(async (request) => {
  const actor = await requireUser(request);
  return Response.json({ workspaces: await listMyWorkspaces(actor.user.id) });
});

/** A new workspace owned by the caller (free plan); it becomes the current one. */
export const POST = route(async (request) => {
  const actor = await requireUser(request);
  const { name } = await readJson(request, createWorkspaceSchema);
  const workspace = await createWorkspace(actor, name, request);
  return Response.json({ workspace }, { status: 201, headers: { 'set-cookie': workspaceCookieHeader(workspace.id) } });
});
